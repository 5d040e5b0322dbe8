package arima

// forecast writes h-step forecasts of the (regression-adjusted) series
// and their variances in units of σ² from the filtered state left by
// filter. It overwrites the filter state.
func (k *kalman) forecast(mean, variance []float64) {
	rd, r := k.rd, k.r
	for l := range mean {
		k.predict()
		copy(k.a, k.anew)
		copy(k.pm, k.pnew)
		fc := k.a[0]
		for _, i := range k.deltaIdx {
			fc += k.delta[i] * k.a[r+i]
		}
		mean[l] = fc
		// Z'PZ with Z = (1, 0.., delta).
		v := 0.0
		for j := 0; j < rd; j++ {
			zj := k.z(j)
			if zj == 0 {
				continue
			}
			for i := 0; i < rd; i++ {
				if zi := k.z(i); zi != 0 {
					v += zi * zj * k.pm[i+rd*j]
				}
			}
		}
		variance[l] = v
	}
}

// z returns element i of the observation vector Z = (1, 0, …, 0, delta).
func (k *kalman) z(i int) float64 {
	if i == 0 {
		return 1
	}
	if i >= k.r {
		return k.delta[i-k.r]
	}
	return 0
}
