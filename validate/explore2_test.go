package validate
import ("testing";"context";"fmt";"math";"time";"gonum.org/v1/gonum/spatial/r3";"github.com/fluctus/fluctus/mesh";"github.com/fluctus/fluctus/scatter";"github.com/fluctus/fluctus/validate/multipole")
func TestExploreNear2(t *testing.T){
 for _, c := range []struct{dR, near, far float64}{{0.1, 0.05, 0.3}} {
  R:=1.0; d:=c.dR*R; zc:=R+d
  g:=mesh.Grading{Near: c.near, Far: c.far}
  size:=func(p r3.Vec) float64 { h:=p.Z+zc; return math.Min(g.Far, g.Near+0.5*(h-d)) }
  m,err:=mesh.GradedSphere(R, g, size); if err!=nil {t.Fatal(err)}
  m=m.Translate(r3.Vec{Z:zc})
  t0:=time.Now()
  pts,err:=scatter.Energies(context.Background(), []scatter.Body{{Name:"s",Mesh:m}}, scatter.Sweep{Body:0,Direction:r3.Vec{Z:-1},Offsets:[]r3.Vec{{}}}, scatter.Settings{Accuracy:1e-3, Substrate:&scatter.Plane{Normal:r3.Vec{Z:1}}})
  if err!=nil {t.Fatal(err)}
  p:=pts[0]
  ref,_:=multipole.Energy(context.Background(), multipole.Config{Field:multipole.Electromagnetic, Geometry:multipole.SpherePlane, R1:R, L:zc, Tol:1e-5})
  fmt.Printf("d/R=%g near=%g tri=%d E=%.6g ref=%.6g ratio=%.4f samples=%d time=%v\n", c.dR, c.near, len(m.Triangles), p.Energy, ref.Energy, p.Energy/ref.Energy, len(p.Samples), time.Since(t0))
 }
}
