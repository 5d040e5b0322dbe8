package charts_test

import (
	"context"
	"fmt"
	"os"
	"path/filepath"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/accuracy"
	"github.com/almanac-go/almanac/decompose"
	"github.com/almanac-go/almanac/examples/charts"
)

// The three pictures of one series of an invented chain of hardware
// stores, written as PNG and SVG files.
func Example() {
	ctx := context.Background()
	y, _, err := decompose.Repair{}.Fill(sales()) // two missing months filled
	if err != nil {
		fmt.Println(err)
		return
	}
	dir, err := os.MkdirTemp("", "charts")
	if err != nil {
		fmt.Println(err)
		return
	}
	defer os.RemoveAll(dir)

	// A fan chart of next year with 50%, 80% and 95% bands.
	fit, err := almanac.SeasonalNaive{}.Fit(ctx, y)
	if err != nil {
		fmt.Println(err)
		return
	}
	fc, err := fit.Forecast(12, 50, 80, 95)
	if err != nil {
		fmt.Println(err)
		return
	}
	fan, err := charts.Fan(y, fit.FittedValues(), fc, charts.Options{Width: 640, Height: 280})
	if err != nil {
		fmt.Println(err)
		return
	}

	// The STL panels.
	d, err := decompose.STL{Robust: true}.Decompose(y)
	if err != nil {
		fmt.Println(err)
		return
	}
	panels, err := charts.Panels(d, charts.Options{Width: 640, Height: 440})
	if err != nil {
		fmt.Println(err)
		return
	}

	// Error by steps ahead of the drift method against the benchmarks.
	bt := accuracy.Backtest{Horizon: 12, Origins: 4, Step: 6}
	c, err := bt.Run(ctx, y, accuracy.Candidate{Name: "drift", Model: almanac.Drift{}})
	if err != nil {
		fmt.Println(err)
		return
	}
	steps, err := charts.StepErrors(c, charts.Options{Width: 640, Height: 280})
	if err != nil {
		fmt.Println(err)
		return
	}

	for name, pic := range map[string]*charts.Picture{"fan": fan, "panels": panels, "steps": steps} {
		for _, ext := range []string{".png", ".svg"} {
			if err := pic.Save(filepath.Join(dir, name+ext)); err != nil {
				fmt.Println(err)
				return
			}
		}
	}
	for _, pic := range []*charts.Picture{fan, panels, steps} {
		w, h := pic.Size()
		fmt.Printf("%d × %d pixels\n", w, h)
	}
	// Output:
	// 640 × 280 pixels
	// 640 × 440 pixels
	// 640 × 280 pixels
}
