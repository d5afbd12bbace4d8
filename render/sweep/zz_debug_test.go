package sweep
import ("testing";"context";"kerrscope/scene";"kerrscope/render")
func TestZZDebug(t *testing.T){
 s:=scene.Default(); s.Screen.Width,s.Screen.Height=64,64; s.Output.Directory=t.TempDir()
 a,_:=ParseAxis("spin=0.5:0.999999:6:log1m")
 p,err:=NewPlan(s,[]Axis{a},render.Scales{}); if err!=nil{t.Fatal(err)}
 for _,pt:=range p.Points{ f,_:=render.Render(context.Background(),pt.Scene,nil); t.Log(pt.Values, f.AutoScales())}
 sc,_:=p.chooseScales(context.Background()); t.Log(sc)
}
