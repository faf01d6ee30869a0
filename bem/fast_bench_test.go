package bem

import (
	"context"
	"fmt"
	"math"
	"syscall"
	"testing"
	"time"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/spatial/r3"
)

// BenchmarkAssembleCrossGaps reports triangle pairs per second for the
// interaction block of two 1280-triangle unit spheres at several centre
// distances (gap = distance - 2) and κR = 1, and the share of pairs served by
// each rule: the moment expansion (share-expand), the far product rules of
// levels 0-4 not replaced by it, then near pairs.
func BenchmarkAssembleCrossGaps(b *testing.B) {
	s := testSurface(b, 8)
	op, _ := NewEFIE(1)
	for _, dist := range []float64{2.2, 3, 5, 10} {
		o := s.Translate(r3.Vec{Z: dist})
		b.Run(fmt.Sprintf("dist=%g", dist), func(b *testing.B) {
			m := mat.NewDense(s.Len(), o.Len(), nil)
			pairs := float64(len(s.Panels)) * float64(len(o.Panels))
			b.ResetTimer()
			cpu0 := cpuTime()
			for i := 0; i < b.N; i++ {
				if err := (Assembler{}).Cross(context.Background(), m, op, s, o); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(pairs*float64(b.N)/b.Elapsed().Seconds(), "pairs/s")
			b.ReportMetric(pairs*float64(b.N)/(cpuTime()-cpu0).Seconds(), "pairs/cpu-s")
			b.ReportMetric(pairs, "pairs")
			b.StopTimer()
			count := make([]int, len(panelRules)+1)
			expand := 0
			for i := range s.Panels {
				for j := range o.Panels {
					ps, pt := &s.Panels[i], &o.Panels[j]
					lv, r := op.Quad.levelKappa(op.Kappa, ps, pt)
					switch {
					case lv > 0 && op.Quad.expands(op.Kappa, max(ps.Size, pt.Size), r):
						expand++
					case lv < 0:
						count[len(panelRules)]++
					default:
						count[lv]++
					}
				}
			}
			b.ReportMetric(float64(expand)/pairs, "share-expand")
			for lv, c := range count[:5] {
				b.ReportMetric(float64(c)/pairs, fmt.Sprintf("share-far%d", lv))
			}
			b.ReportMetric(float64(count[len(panelRules)])/pairs, "share-near")
		})
	}
}

// BenchmarkAssembleSelfCPU is BenchmarkAssembleSelf with the process CPU
// time as well: on a shared machine pairs per CPU-second times the number of
// cores estimates the figure of a quiet one.
func BenchmarkAssembleSelfCPU(b *testing.B) {
	s := testSurface(b, 8)
	op, _ := NewEFIE(1)
	m := mat.NewSymDense(s.Len(), nil)
	pairs := float64(len(s.Panels)) * float64(len(s.Panels)+1) / 2
	b.ResetTimer()
	cpu0 := cpuTime()
	for i := 0; i < b.N; i++ {
		if err := (Assembler{}).Self(context.Background(), m, op, s); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(pairs*float64(b.N)/b.Elapsed().Seconds(), "pairs/s")
	b.ReportMetric(pairs*float64(b.N)/(cpuTime()-cpu0).Seconds(), "pairs/cpu-s")
	b.ReportMetric(pairs, "pairs")
}

// cpuTime returns the user and system CPU time of the process so far.
func cpuTime() time.Duration {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return 0
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
}

// BenchmarkPairFar times single far pairs (one goroutine): the EFIE entries
// of a level-1 pair (served by the moment expansion) and of a centroid
// (level 0) pair, the 3-point product-rule moments alone, and the expansion
// moments alone.
func BenchmarkPairFar(b *testing.B) {
	s := testSurface(b, 8)
	op, _ := NewEFIE(1)
	for _, c := range []struct {
		name string
		dist float64
	}{{"level1", 3}, {"level0", 10}} {
		o := s.Translate(r3.Vec{Z: c.dist})
		b.Run(c.name, func(b *testing.B) {
			var blk [3][3]float64
			n := len(o.Panels)
			cpu0 := cpuTime()
			t := 0
			for i := 0; i < b.N; i++ {
				op.Pair(&blk, s, 5, o, t, false)
				if t++; t == n {
					t = 0
				}
			}
			b.ReportMetric(float64((cpuTime()-cpu0).Nanoseconds())/float64(b.N), "cpu-ns/pair")
		})
		b.Run(c.name+"-moments", func(b *testing.B) {
			n := len(o.Panels)
			lv, _ := op.Quad.level(op.Kernel, &s.Panels[0], &o.Panels[0])
			var m Moments
			cpu0 := cpuTime()
			t := 0
			for i := 0; i < b.N; i++ {
				m = farMomentsYukawa(1, 20, s.points[lv][5], o.points[lv][t])
				if t++; t == n {
					t = 0
				}
			}
			_ = m
			b.ReportMetric(float64((cpuTime()-cpu0).Nanoseconds())/float64(b.N), "cpu-ns/pair")
		})
	}
	o := s.Translate(r3.Vec{Z: 3})
	b.Run("expansion-moments", func(b *testing.B) {
		n := len(o.Panels)
		ps := &s.Panels[5]
		var e expCoef
		cpu0 := cpuTime()
		t := 0
		for i := 0; i < b.N; i++ {
			pt := &o.Panels[t]
			R := r3.Sub(ps.Centroid, pt.Centroid)
			expansionCoefs(&e, 1, ps.Area*pt.Area, R.X, R.Y, R.Z, math.Sqrt(r3.Dot(R, R)), &s.exp[5], &o.exp[t])
			if t++; t == n {
				t = 0
			}
		}
		_ = e
		b.ReportMetric(float64((cpuTime()-cpu0).Nanoseconds())/float64(b.N), "cpu-ns/pair")
	})
}
