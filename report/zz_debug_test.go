package report
import ("testing")
func TestZZDebug(t *testing.T){
 if _, err := WriteAll("/tmp/rt", "lowmere", fxInput()); err != nil { t.Fatal(err) }
 if _, err := WriteAll("/tmp/rt/scan", "lowmere", fxScanInput()); err != nil { t.Fatal(err) }
}
