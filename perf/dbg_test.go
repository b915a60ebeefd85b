package perf

import (
	"fmt"
	"testing"
)

func TestDbg(t *testing.T) {
	a, _ := Builtin("demo-widebody")
	fmt.Printf("%+v\n", a.Engines)
	p := FLToPressure(350)
	fmt.Println(p, isaTemperatureAtPressure(p), a.Engines.thrustLapse(p, 218.8, 0.8))
}
