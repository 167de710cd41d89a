package weather_test

import (
	"fmt"

	"pitcard/weather"
)

// The air from a reading: a handheld meter's figures as a crew types them
// (88 °F, station pressure 27.62 inHg, 40 % humidity) at a track 2240 ft up,
// checked, then derived into density altitude and the SAE J1349 correction
// factor (an invented evening at an invented track).
func ExampleReading_Derive() {
	temp, err := weather.ParseTemperature("88F", weather.DegF)
	if err != nil {
		fmt.Println(err)
		return
	}
	baro, err := weather.ParsePressure("27.62", weather.UnitInHg)
	if err != nil {
		fmt.Println(err)
		return
	}
	rh, err := weather.ParsePercent("40")
	if err != nil {
		fmt.Println(err)
		return
	}
	r := weather.Reading{Temp: temp, Baro: baro, BaroKind: weather.StationPressure, RH: rh, WindUnknown: true}
	elev := weather.Feet(2240)
	if err := r.Validate(elev); err != nil {
		fmt.Println(err)
		return
	}
	a := r.Derive(elev)
	fmt.Printf("density altitude %.0f ft\n", a.DensityAltitude.Feet())
	fmt.Printf("SAE J1349 correction %.4f\n", a.CFJ1349)
	fmt.Printf("grains of water %.0f per lb of dry air\n", a.Grains)
	// Output:
	// density altitude 4766 ft
	// SAE J1349 correction 1.1066
	// grains of water 86 per lb of dry air
}

// A value outside its range is refused with the field, the value and the
// valid range.
func ExampleReading_Validate() {
	r := weather.Reading{Temp: weather.Fahrenheit(150), Baro: weather.InHg(28.9), RH: 0.4}
	fmt.Println(r.Validate(weather.Feet(900)))
	// Output:
	// temp "150 °F" is outside -40..140 °F
}
