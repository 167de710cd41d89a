package engine

import (
	"math/rand/v2"
	"reflect"
	"testing"
	"time"

	"github.com/shopspring/decimal"
)

// The held-out cache is keyed by a digest of what a prediction is made
// from: a pass that differs in any one field, however small, must give
// another key, or a card would reuse a prediction made from other passes
// (common practice for a content-addressed cache, no source). The fields
// are found by reflection, so a field added to a pass, its reading or the
// next pass's conditions later is checked too.
func TestHeldOutKeySeesEveryField(t *testing.T) {
	g := gen{rng: rand.New(rand.NewPCG(5, 6)), truth: DefaultParams(Natural), car: testCar}
	passes := g.season(1, 3)
	passes[1].Extra = map[string]string{"crew": "a"}
	passes[1].Dial = decimal.NewNullDecimal(decimal.RequireFromString("11.50"))
	c := CalibrateInput{Car: testCar, Track: testTrack, Passes: passes}
	next := PredictInput{Air: passes[2].Air, Prep: 1, Time: passes[2].Time}
	base := baseKey(c)
	want := heldOutKey(base, c, next)
	var walk func(path string, v reflect.Value)
	mutated := 0
	check := func(path string, mutate func(reflect.Value), v reflect.Value) {
		t.Run(path, func(t *testing.T) {
			old := reflect.New(v.Type()).Elem()
			old.Set(v)
			mutate(v)
			if got := heldOutKey(base, c, next); got == want {
				t.Errorf("a pass with another %s has the same held-out key", path)
			}
			v.Set(old)
			if got := heldOutKey(base, c, next); got != want {
				t.Fatalf("%s put back: the key did not come back", path)
			}
		})
		mutated++
	}
	walk = func(path string, v reflect.Value) {
		switch x := v.Addr().Interface().(type) {
		case *time.Time:
			check(path, func(v reflect.Value) { v.Set(reflect.ValueOf(x.Add(time.Nanosecond))) }, v)
			check(path+" zone", func(v reflect.Value) { v.Set(reflect.ValueOf(x.In(time.FixedZone("X", 3600)))) }, v)
			return
		case *decimal.NullDecimal:
			check(path+" valid", func(v reflect.Value) { x.Valid = !x.Valid }, v)
			check(path+" value", func(v reflect.Value) { x.Decimal = x.Decimal.Add(decimal.New(1, -3)) }, v)
			check(path+" big", func(v reflect.Value) {
				x.Valid, x.Decimal = true, decimal.RequireFromString("123456789012345678901234.5")
			}, v)
			return
		}
		switch v.Kind() {
		case reflect.Struct:
			for i := range v.NumField() {
				walk(path+"."+v.Type().Field(i).Name, v.Field(i))
			}
		case reflect.Array:
			for i := range v.Len() {
				walk(path+"["+string(rune('0'+i))+"]", v.Index(i))
			}
		case reflect.Int, reflect.Int64, reflect.Int32:
			check(path, func(v reflect.Value) { v.SetInt(v.Int() + 1) }, v)
		case reflect.Float64:
			check(path, func(v reflect.Value) { v.SetFloat(v.Float() + 1e-9) }, v)
		case reflect.String:
			check(path, func(v reflect.Value) { v.SetString(v.String() + "x") }, v)
		case reflect.Bool:
			check(path, func(v reflect.Value) { v.SetBool(!v.Bool()) }, v)
		case reflect.Map:
			check(path, func(v reflect.Value) {
				m := map[string]string{"crew": "b"}
				v.Set(reflect.ValueOf(m))
			}, v)
		default:
			t.Fatalf("%s: a field of kind %s the test cannot change: teach it, and heldOutKey", path, v.Kind())
		}
	}
	walk("pass", reflect.ValueOf(&passes[1]).Elem())
	walk("next", reflect.ValueOf(&next).Elem())
	walk("track", reflect.ValueOf(&c.Track).Elem())
	if mutated < 60 {
		t.Errorf("only %d fields changed: the walk missed the pass's fields", mutated)
	}
}
