package moments
import ("context";"testing";"time";"mixdepth/circuits")
func TestZZProbe(t *testing.T){
 for _,spec:=range []string{"grid:3x4","line:10"}{
  g:=denseGraph(t,spec)
  l:=&circuits.Layered{Classes: circuits.LayeredClasses(g)}
  t0:=time.Now()
  f,err:=FramePotential2(context.Background(),g,l,[]int{4,10,20,40,100})
  t.Logf("%s layered %v %v %v", spec, f, err, time.Since(t0))
  if g.Qubits<=10 {
  t0=time.Now()
  f,err=FramePotential2(context.Background(),g,&circuits.RandomEdge{Edges:g.Edges},[]int{10,50,200,1000, 100000})
  t.Logf("%s random %v %v %v", spec, f, err, time.Since(t0))
  }
 }
}
