package stl

// psort is the partial sort of R's stl.f (a Singleton/Chambers partial
// quicksort, CACM algorithms 347 and 410): on return a[ind[i]-1] holds
// the ind[i]-th smallest value for each 1-based position in ind, provided
// ind is increasing. R's stlrwt calls it with the decreasing positions
// (n/2+1, n−n/2) for even n, and the algorithm then does not always
// finish the upper position; the robustness scale R uses is whatever
// this routine leaves there, so it is reproduced statement by statement.
func psort(a []float64, ind []int) {
	n, ni := len(a), len(ind)
	if n < 2 || ni == 0 {
		return
	}
	// The Fortran's stacks hold 16 entries, enough for n < 2^16 (the
	// depth is at most log2 n); 64 entries keep any length in bounds and
	// change nothing below that.
	var indu, indl, iu, il [64]int
	var p, jl, ju, i, j, m, k, ij, l int
	var t, tt float64
	at := func(x int) float64 { return a[x-1] }
	set := func(x int, v float64) { a[x-1] = v }

	jl = 1
	ju = ni
	indl[0] = 1
	indu[0] = ni
	i = 1
	j = n
	m = 1

L161:
	if i < j {
		goto L10
	}
L166:
	m--
	if m == 0 {
		return
	}
	i = il[m-1]
	j = iu[m-1]
	jl = indl[m-1]
	ju = indu[m-1]
	if !(jl <= ju) {
		goto L166
	}
L173:
	if !(j-i > 10) {
		goto L174
	}
L10:
	k = i
	ij = (i + j) / 2
	t = at(ij)
	if at(i) > t {
		set(ij, at(i))
		set(i, t)
		t = at(ij)
	}
	l = j
	if at(j) < t {
		set(ij, at(j))
		set(j, t)
		t = at(ij)
		if at(i) > t {
			set(ij, at(i))
			set(i, t)
			t = at(ij)
		}
	}
L181:
	l--
	if at(l) <= t {
		tt = at(l)
		for {
			k++
			if at(k) >= t {
				break
			}
		}
		if k > l {
			goto L183
		}
		set(l, at(k))
		set(k, tt)
	}
	goto L181
L183:
	indl[m-1] = jl
	indu[m-1] = ju
	p = m
	m++
	if l-i <= j-k {
		il[p-1] = k
		iu[p-1] = j
		j = l
		for {
			if jl > ju {
				goto L166
			}
			if ind[ju-1] <= j {
				break
			}
			ju--
		}
		indl[p-1] = ju + 1
	} else {
		il[p-1] = i
		iu[p-1] = l
		i = k
		for {
			if jl > ju {
				goto L166
			}
			if ind[jl-1] >= i {
				break
			}
			jl++
		}
		indu[p-1] = jl - 1
	}
	goto L173
L174:
	if i == 1 {
		goto L161
	}
	i--
L209:
	i++
	if i == j {
		goto L166
	}
	t = at(i + 1)
	if at(i) > t {
		k = i
		for {
			set(k+1, at(k))
			k--
			if t >= at(k) {
				break
			}
		}
		set(k+1, t)
	}
	goto L209
}
