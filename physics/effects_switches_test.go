package physics

import (
	"reflect"
	"testing"
)

// Every switch of Effects (found by reflection, so a switch added later is
// checked without being listed here) counts in Any when it is on alone and
// is on in RealisticEffects, junco's default of every effect on (the zero
// model.Effects); the zero value has none on.
func TestEverySwitchInAnyAndRealistic(t *testing.T) {
	if (Effects{}).Any() {
		t.Error("the zero Effects reports an effect on")
	}
	realistic := reflect.ValueOf(RealisticEffects())
	typ := reflect.TypeOf(Effects{})
	n := 0
	for i := 0; i < typ.NumField(); i++ {
		if typ.Field(i).Type.Kind() != reflect.Bool {
			continue
		}
		n++
		var e Effects
		reflect.ValueOf(&e).Elem().Field(i).SetBool(true)
		if !e.Any() {
			t.Errorf("%s on alone: Any reports none", typ.Field(i).Name)
		}
		if !realistic.Field(i).Bool() {
			t.Errorf("%s is off in RealisticEffects", typ.Field(i).Name)
		}
	}
	if n == 0 {
		t.Error("no switch found in Effects")
	}
}
