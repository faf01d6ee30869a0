package multipole

import (
	"context"
	"fmt"
	"math"
	"runtime"
	"sync"
)

// maxLMax bounds the adaptive multipole order.
const maxLMax = 600

// kappaMaxGaps is where the κ integral and the Matsubara sum stop, in units of
// 1/gap: the integrand falls like e^{-2κ·gap}, below e^{-80} there.
const kappaMaxGaps = 40.0

// startLMax is the first multipole order tried when LMax = 0. The exact
// round trip converges geometrically in l, roughly like ρ^{-2l} with ρ the
// bispherical ratio of the pair (common practice: lmax ∝ R/gap at small gaps);
// the constants only set where the adaptive search starts.
func startLMax(c *Config) int {
	r := c.R1
	if c.Geometry == SphereSphere {
		r = math.Max(c.R1, c.R2)
	}
	l := 3 + int(math.Ceil(1.5*r/c.gap()))
	return min(l, maxLMax)
}

// nextLMax is the next order of the adaptive search.
func nextLMax(l int) int { return l + max(3, l/5) }

// evaluate returns ln det(I - N(κ)) and, if wantTrace, Tr[(I-N)^{-1} dN/dL],
// summed over m = -lmax..lmax, for each κ in kappas. The (κ, m) blocks run in
// parallel on GOMAXPROCS workers, largest first.
func evaluate(ctx context.Context, cfg *Config, kappas []float64, lmax int, wantTrace bool) (logDet, trace []float64, err error) {
	if lmax < 1 {
		lmax = 1
	}
	lf := newLogFactorials(4*lmax + 16)
	setups := make([]*kappaSetup, len(kappas))
	for i, k := range kappas {
		if !(k >= 0) || math.IsInf(k, 0) {
			return nil, nil, fmt.Errorf("κ = %g: the imaginary wavenumber must be finite and ≥ 0", k)
		}
		setups[i] = newKappaSetup(cfg, k, lmax, lf)
	}
	nm := lmax + 1
	blockLD := make([]float64, len(kappas)*nm)
	blockTr := make([]float64, len(kappas)*nm)

	type task struct{ ki, m int }
	tasks := make(chan task)
	var (
		wg       sync.WaitGroup
		mu       sync.Mutex
		firstErr error
	)
	ctx, cancel := context.WithCancel(ctx)
	defer cancel()
	workers := min(runtime.GOMAXPROCS(0), len(kappas)*nm)
	for w := 0; w < workers; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			var ws workspace
			for t := range tasks {
				if ctx.Err() != nil {
					continue
				}
				ld, tr, err := setups[t.ki].block(t.m, wantTrace, &ws)
				if err != nil {
					mu.Lock()
					if firstErr == nil {
						firstErr = fmt.Errorf("κ = %g, lmax = %d: %w", kappas[t.ki], lmax, err)
					}
					mu.Unlock()
					cancel()
					continue
				}
				blockLD[t.ki*nm+t.m] = ld
				blockTr[t.ki*nm+t.m] = tr
			}
		}()
	}
feed:
	for m := 0; m <= lmax; m++ {
		for ki := range kappas {
			select {
			case tasks <- task{ki, m}:
			case <-ctx.Done():
				break feed
			}
		}
	}
	close(tasks)
	wg.Wait()
	if firstErr != nil {
		return nil, nil, firstErr
	}
	if err := ctx.Err(); err != nil {
		return nil, nil, err
	}
	logDet = make([]float64, len(kappas))
	trace = make([]float64, len(kappas))
	for ki := range kappas {
		var s, st float64
		for m := lmax; m >= 0; m-- { // small terms first
			w := 2.0
			if m == 0 {
				w = 1
			}
			s += w * blockLD[ki*nm+m]
			st += w * blockTr[ki*nm+m]
		}
		logDet[ki], trace[ki] = s, st
	}
	return logDet, trace, nil
}

// LogDet returns ln det(I - N(κ)) summed over all m, the integrand of the
// TGTG formula at imaginary wavenumber κ ≥ 0 (1/L0; κ = 0 is the exact static
// limit), and the multipole order used. With cfg.LMax = 0 the order is raised
// until the value changes by less than cfg.Tol relative.
func LogDet(cfg Config, kappa float64) (float64, int, error) {
	c, err := cfg.validated()
	if err != nil {
		return 0, 0, err
	}
	one := []float64{kappa}
	ctx := context.Background()
	if c.LMax > 0 {
		ld, _, err := evaluate(ctx, &c, one, c.LMax, false)
		if err != nil {
			return 0, 0, fmt.Errorf("multipole: ln det: %w", err)
		}
		return ld[0], c.LMax, nil
	}
	l := startLMax(&c)
	prev, _, err := evaluate(ctx, &c, one, l, false)
	if err != nil {
		return 0, 0, fmt.Errorf("multipole: ln det: %w", err)
	}
	for {
		l2 := nextLMax(l)
		if l2 > maxLMax {
			return prev[0], l, fmt.Errorf("multipole: κ = %g: ln det not converged to %g at lmax = %d", kappa, c.Tol, l)
		}
		cur, _, err := evaluate(ctx, &c, one, l2, false)
		if err != nil {
			return 0, 0, fmt.Errorf("multipole: ln det: %w", err)
		}
		if math.Abs(cur[0]-prev[0]) <= c.Tol*math.Abs(cur[0]) {
			return cur[0], l2, nil
		}
		l, prev = l2, cur
	}
}
