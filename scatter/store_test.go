package scatter

import (
	"context"
	"errors"
	"math"
	"reflect"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

// memStore is a Store in memory that counts its calls and can fail after a
// number of saves (as a killed run stops).
type memStore struct {
	units     map[[2]float64]WorkUnit
	loads     int // hits
	saves     int
	failAfter int // Save fails once this many units are saved; 0: never
}

func newMemStore() *memStore { return &memStore{units: map[[2]float64]WorkUnit{}} }

func (m *memStore) Load(p int, kappa float64) (WorkUnit, bool) {
	v, ok := m.units[[2]float64{float64(p), kappa}]
	if ok {
		m.loads++
	}
	return v, ok
}

var errStop = errors.New("stopped")

func (m *memStore) Save(u WorkUnit) error {
	if m.failAfter > 0 && m.saves >= m.failAfter {
		return errStop
	}
	m.units[[2]float64{float64(u.Point), u.Kappa}] = u
	m.saves++
	return nil
}

// TestStoreResumeAndPoints checks the checkpoint contract of Energies on two
// coarse spheres (a few seconds): a run stopped part-way and resumed from its
// store, and runs restricted to disjoint sets of points, give exactly (every
// bit) the results of one uninterrupted run — the same κ nodes and the same
// values, summed in the same order — at T = 0 and at T > 0, with forces.
// Tolerance: none (exact equality); anything else would mean the resumed run
// integrated other nodes.
func TestStoreResumeAndPoints(t *testing.T) {
	if testing.Short() {
		t.Skip("solver runs")
	}
	m := sphere(t, 1)
	bodies := []Body{{Name: "a", Mesh: m}, {Name: "b", Mesh: m.Translate(r3.Vec{Z: 3})}}
	sweep := Sweep{Body: 1, Direction: r3.Vec{Z: -1}, Offsets: []r3.Vec{{}, {Z: 0.5}, {Z: 1}}, Centre: r3.Vec{Z: 3}}
	for _, tc := range []struct {
		name string
		set  Settings
	}{
		{"T=0", Settings{Accuracy: 1e-3, Threads: 1, Forces: true}},
		{"T>0", Settings{Accuracy: 1e-3, Threads: 1, ThermalWavenumber: 0.8}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			ctx := context.Background()
			whole, err := Energies(ctx, bodies, sweep, tc.set)
			if err != nil {
				t.Fatal(err)
			}
			// Stopped after a few units, then resumed.
			st := newMemStore()
			set := tc.set
			set.Store = st
			st.failAfter = 7
			if _, err := Energies(ctx, bodies, sweep, set); !errors.Is(err, errStop) {
				t.Fatalf("stopped run: error %v, want the store's", err)
			}
			st.failAfter = 0
			resumed, err := Energies(ctx, bodies, sweep, set)
			if err != nil {
				t.Fatal(err)
			}
			if st.loads != 7 {
				t.Errorf("the resumed run loaded %d units, want the 7 saved", st.loads)
			}
			if !reflect.DeepEqual(resumed, whole) {
				t.Errorf("resumed results differ from the uninterrupted run:\n%+v\n%+v", resumed[0], whole[0])
			}
			// Disjoint shards of the points.
			for _, own := range [][]int{{0, 2}, {1}} {
				set := tc.set
				set.Points = own
				part, err := Energies(ctx, bodies, sweep, set)
				if err != nil {
					t.Fatal(err)
				}
				for p := range sweep.Offsets {
					mine := p == own[0] || p == own[len(own)-1]
					switch {
					case mine && !reflect.DeepEqual(part[p], whole[p]):
						t.Errorf("points %v: point %d differs from the whole run", own, p)
					case !mine && (part[p].Energy != 0 || part[p].Samples != nil):
						t.Errorf("points %v: point %d was computed", own, p)
					}
				}
			}
			if whole[0].Energy >= 0 || math.IsNaN(whole[0].Energy) {
				t.Errorf("energy %g, want negative", whole[0].Energy)
			}
		})
	}
	if _, err := Energies(context.Background(), bodies, sweep, Settings{Points: []int{3}}); err == nil {
		t.Error("a point outside the sweep was accepted")
	}
}
