package main

import (
	"fmt"
	"math"
	"os"
	"runtime"
	"slices"
	"strconv"
	"strings"
	"time"
)

// workload is one named thing to time.
type workload struct {
	name  string
	about string
	// setup reads and prepares the inputs (not timed).
	setup func(cfg config) (*prepared, error)
}

// prepared is a workload ready to run: either one operation (op) or a
// catalogue of them, one per series (items).
type prepared struct {
	n     int
	op    func() error
	items []item
	// check summarises the result of the last run, for the check field.
	check func() string
}

type item struct {
	key string
	op  func() error
}

type timing struct {
	repeats, seriesRepeats int
	minTime                float64 // CPU seconds per repeat, at least
}

// result is one output line.
type result struct {
	Workload          string  `json:"workload"`
	N                 int     `json:"n"`
	NsPerOp           float64 `json:"ns_per_op"`
	WallNsPerOp       float64 `json:"wall_ns_per_op"`
	AllocsPerOp       float64 `json:"allocs_per_op"`
	BytesPerOp        float64 `json:"bytes_per_op"`
	Repeats           int     `json:"repeats"`
	OpsPerRepeat      int     `json:"ops_per_repeat"`
	PerSeriesMaxNs    float64 `json:"per_series_max_ns,omitempty"`
	PerSeriesMaxKey   string  `json:"per_series_max_key,omitempty"`
	PerSeriesMedianNs float64 `json:"per_series_median_ns,omitempty"`
	Check             string  `json:"check"`
	Load1             float64 `json:"load1"`
	GOMAXPROCS        int     `json:"gomaxprocs"`
}

// measure prepares and times w.
func measure(w workload, cfg config, t timing) (result, error) {
	p, err := w.setup(cfg)
	if err != nil {
		return result{}, err
	}
	res := result{Workload: w.name, N: p.n, Load1: load1(), GOMAXPROCS: runtime.GOMAXPROCS(0)}
	if p.items != nil {
		err = timeCatalogue(p, t.seriesRepeats, &res)
	} else {
		err = timeOp(p, t, &res)
	}
	if err != nil {
		return result{}, err
	}
	if p.check != nil {
		res.Check = p.check()
	}
	// Whole nanoseconds, allocations to a tenth.
	for _, v := range []*float64{&res.NsPerOp, &res.WallNsPerOp, &res.BytesPerOp, &res.PerSeriesMaxNs, &res.PerSeriesMedianNs} {
		*v = math.Round(*v)
	}
	res.AllocsPerOp = math.Round(10*res.AllocsPerOp) / 10
	return res, nil
}

// timeOp runs p.op once (warm-up and calibration), then repeats batches
// of k operations, k chosen so that a batch takes at least t.minTime of
// CPU time.
func timeOp(p *prepared, t timing, res *result) error {
	c0, w0 := cpuTime(), time.Now()
	if err := p.op(); err != nil {
		return err
	}
	first := max(cpuTime()-c0, time.Since(w0)/4, time.Microsecond)
	k := max(1, int(math.Ceil(t.minTime*float64(time.Second)/float64(first))))
	cpu := make([]float64, t.repeats)
	wall := make([]float64, t.repeats)
	var ms0, ms1 runtime.MemStats
	runtime.GC()
	runtime.ReadMemStats(&ms0)
	for r := range t.repeats {
		c0, w0 := cpuTime(), time.Now()
		for range k {
			if err := p.op(); err != nil {
				return err
			}
		}
		cpu[r] = float64(cpuTime()-c0) / float64(k)
		wall[r] = float64(time.Since(w0)) / float64(k)
	}
	runtime.ReadMemStats(&ms1)
	ops := float64(k * t.repeats)
	res.NsPerOp, res.WallNsPerOp = median(cpu), median(wall)
	res.AllocsPerOp = float64(ms1.Mallocs-ms0.Mallocs) / ops
	res.BytesPerOp = float64(ms1.TotalAlloc-ms0.TotalAlloc) / ops
	res.Repeats, res.OpsPerRepeat = t.repeats, k
	return nil
}

// timeCatalogue runs every item once per repeat, timing each; a series'
// time is the median of its repeats, ns_per_op the mean over series.
func timeCatalogue(p *prepared, repeats int, res *result) error {
	n := len(p.items)
	per := make([][]float64, n)
	var wallSum float64
	var ms0, ms1 runtime.MemStats
	runtime.GC()
	runtime.ReadMemStats(&ms0)
	for range repeats {
		w0 := time.Now()
		for i, it := range p.items {
			c0 := cpuTime()
			if err := it.op(); err != nil {
				return fmt.Errorf("%s: %w", it.key, err)
			}
			per[i] = append(per[i], float64(cpuTime()-c0))
		}
		wallSum += float64(time.Since(w0))
	}
	runtime.ReadMemStats(&ms1)
	med := make([]float64, n)
	total := 0.0
	for i := range per {
		med[i] = median(per[i])
		total += med[i]
		if med[i] > res.PerSeriesMaxNs || res.PerSeriesMaxKey == "" {
			res.PerSeriesMaxNs, res.PerSeriesMaxKey = med[i], p.items[i].key
		}
	}
	ops := float64(n * repeats)
	res.NsPerOp = total / float64(n)
	res.WallNsPerOp = wallSum / ops
	res.PerSeriesMedianNs = median(med)
	res.AllocsPerOp = float64(ms1.Mallocs-ms0.Mallocs) / ops
	res.BytesPerOp = float64(ms1.TotalAlloc-ms0.TotalAlloc) / ops
	res.Repeats, res.OpsPerRepeat = repeats, n
	return nil
}

func median(v []float64) float64 {
	s := slices.Clone(v)
	slices.Sort(s)
	m := len(s) / 2
	if len(s)%2 == 1 {
		return s[m]
	}
	return (s[m-1] + s[m]) / 2
}

// load1 returns the one-minute load average (Linux), or −1.
func load1() float64 {
	b, err := os.ReadFile("/proc/loadavg")
	if err != nil {
		return -1
	}
	f := strings.Fields(string(b))
	if len(f) == 0 {
		return -1
	}
	v, err := strconv.ParseFloat(f[0], 64)
	if err != nil {
		return -1
	}
	return v
}
