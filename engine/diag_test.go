package engine_test

import (
	"fmt"
	"math"
	"os"
	"testing"

	"pitcard/engine"
	"pitcard/internal/truthsim"
)

func corr(x, y []float64) float64 {
	mx, my := meanOf(x), meanOf(y)
	var sxy, sxx, syy float64
	for i := range x {
		sxy += (x[i] - mx) * (y[i] - my)
		sxx += (x[i] - mx) * (x[i] - mx)
		syy += (y[i] - my) * (y[i] - my)
	}
	return sxy / math.Sqrt(sxx*syy)
}

func TestDiag(t *testing.T) {
	if os.Getenv("DIAG") == "" {
		t.Skip()
	}
	for i, w := range truthsim.Worlds() {
		passes := w.Season()
		car, trk := w.CarYAML(claims[i]), w.EngineTrack()
		logged := make([]engine.Pass, len(passes))
		for i, p := range passes {
			logged[i] = p.Logged
		}
		var res, tt, at, hr, inday, da, wt, typ []float64
		for k, p := range passes {
			if p.Day < w.Days-5 || p.Aborted {
				continue
			}
			fit, _ := engine.Calibrate(engine.CalibrateInput{Car: car, Track: trk, Passes: logged[:k], Now: p.Logged.Time})
			pr := engine.Predict(fit, engine.PredictInput{Air: p.Logged.Air, Prep: 1, WeightLb: p.Logged.WeightLb, Time: p.Logged.Time})
			actual, _ := p.Logged.ETAt(w.Car.DistanceFt)
			res = append(res, actual-pr.Finish().ET)
			tt = append(tt, p.Logged.Air.TrackTemp.Fahrenheit())
			at = append(at, p.Logged.Air.Temp.Fahrenheit())
			hr = append(hr, float64(p.Logged.Time.Hour())+float64(p.Logged.Time.Minute())/60)
			inday = append(inday, float64(p.InDay))
			da = append(da, p.Logged.Air.Derive(0).DensityAltitude.Feet())
			wt = append(wt, p.Logged.WeightLb)
			typ = append(typ, actual-p.Typical[truthsim.FinishIndex(w.Car.DistanceFt)])
			if k == len(passes)-1 {
				fmt.Printf("   params %+v\n", fit.Params)
			}
		}
		fmt.Printf("%s: mean res %+.4f; corr track %.2f air %.2f hour %.2f inday %.2f DA %.2f | truth-typical corr track %.2f\n", w.Car.Name, meanOf(res),
			corr(res, tt), corr(res, at), corr(res, hr), corr(res, inday), corr(res, da), corr(typ, tt))
	}
}

func TestDiagSens(t *testing.T) {
	if os.Getenv("DIAG") == "" {
		t.Skip()
	}
	for i, w := range truthsim.Worlds() {
		passes := w.Season()
		car, trk := w.CarYAML(claims[i]), w.EngineTrack()
		logged := make([]engine.Pass, len(passes))
		for i, p := range passes {
			logged[i] = p.Logged
		}
		for _, k := range []int{len(passes) - 7, len(passes) - 1} {
			p := passes[k]
			fit, _ := engine.Calibrate(engine.CalibrateInput{Car: car, Track: trk, Passes: logged[:k], Now: p.Logged.Time})
			pr := engine.Predict(fit, engine.PredictInput{Air: p.Logged.Air, Prep: 1, WeightLb: p.Logged.WeightLb, Time: p.Logged.Time})
			tr, air, baro, rub := w.Sensitivity(p)
			s := pr.Sensitivity
			fmt.Printf("%-30s track %.0fF: truth track %+.4f air %+.4f baro %+.4f rubber/h %+.4f | engine track %+.4f air %+.4f baro %+.4f\n",
				w.Car.Name, p.Logged.Air.TrackTemp.Fahrenheit(), tr, air, baro, rub, s.Per10FTrack, s.Per10FAir, s.PerTenthInHg)
		}
	}
}

func TestDiagPasses(t *testing.T) {
	if os.Getenv("DIAG") == "" {
		t.Skip()
	}
	wi := 0
	fmt.Sscan(os.Getenv("DIAG"), &wi)
	w := truthsim.Worlds()[wi]
	var shift uint64
	fmt.Sscan(os.Getenv("PITCARD_TRUTH_SEED"), &shift)
	w.Seed += shift
	passes := w.Season()
	car, trk := w.CarYAML(claims[wi]), w.EngineTrack()
	logged := make([]engine.Pass, len(passes))
	for i, p := range passes {
		logged[i] = p.Logged
	}
	fin := truthsim.FinishIndex(w.Car.DistanceFt)
	for k, p := range passes {
		if p.Day < w.Days-5 {
			continue
		}
		fit, _ := engine.Calibrate(engine.CalibrateInput{Car: car, Track: trk, Passes: logged[:k], Now: p.Logged.Time})
		pr := engine.Predict(fit, engine.PredictInput{Air: p.Logged.Air, Prep: 1, WeightLb: p.Logged.WeightLb, Time: p.Logged.Time})
		actual, _ := p.Logged.ETAt(w.Car.DistanceFt)
		f := pr.Finish()
		fmt.Printf("day %2d #%d %s air %5.1f track %5.1f | actual %.3f pred %.3f (sd %.3f) err %+.4f | oracle %+.4f typical %+.4f | 60ft act %.3f pred %.3f ab=%v\n",
			p.Day, p.InDay, p.Logged.Time.Format("15:04"), p.Logged.Air.Temp.Fahrenheit(), p.Logged.Air.TrackTemp.Fahrenheit(), actual, f.ET, f.SD, actual-f.ET,
			p.Oracle[fin]-actual, p.Typical[fin]-actual, func() float64 { v, _ := p.Logged.ETAt(60); return v }(), pr.Timers[0].ET, p.Aborted)
	}
}

func TestDiagParams(t *testing.T) {
	if os.Getenv("DIAG") == "" {
		t.Skip()
	}
	wi := 0
	fmt.Sscan(os.Getenv("DIAG"), &wi)
	w := truthsim.Worlds()[wi]
	var shift uint64
	fmt.Sscan(os.Getenv("PITCARD_TRUTH_SEED"), &shift)
	w.Seed += shift
	passes := w.Season()
	car, trk := w.CarYAML(claims[wi]), w.EngineTrack()
	logged := make([]engine.Pass, len(passes))
	for i, p := range passes {
		logged[i] = p.Logged
	}
	for k, p := range passes {
		if p.Day < w.Days-5 || p.Day > w.Days-3 {
			continue
		}
		fit, _ := engine.Calibrate(engine.CalibrateInput{Car: car, Track: trk, Passes: logged[:k], Now: p.Logged.Time})
		var lo, hi float64 = 999, 0
		for _, s := range fit.Samples {
			tt := s.Pass.Air.TrackTemp.Fahrenheit()
			lo, hi = math.Min(lo, tt), math.Max(hi, tt)
		}
		fmt.Printf("day %d #%d: %+v  (track seen %.0f..%.0f, %d samples)\n", p.Day, p.InDay, fit.Params, lo, hi, len(fit.Samples))
	}
}

func TestDiagBias(t *testing.T) {
	if os.Getenv("DIAG") == "" {
		t.Skip()
	}
	var shift uint64
	fmt.Sscan(os.Getenv("PITCARD_TRUTH_SEED"), &shift)
	for wi, w := range truthsim.Worlds() {
		w.Seed += shift
		passes := w.Season()
		car, trk := w.CarYAML(claims[wi]), w.EngineTrack()
		logged := make([]engine.Pass, len(passes))
		for i, p := range passes {
			logged[i] = p.Logged
		}
		var first, later, z []float64
		for k, p := range passes {
			if p.Day < w.Days-5 || p.Aborted {
				continue
			}
			fit, _ := engine.Calibrate(engine.CalibrateInput{Car: car, Track: trk, Passes: logged[:k], Now: p.Logged.Time})
			pr := engine.Predict(fit, engine.PredictInput{Air: p.Logged.Air, Prep: 1, WeightLb: p.Logged.WeightLb, Time: p.Logged.Time})
			actual, _ := p.Logged.ETAt(w.Car.DistanceFt)
			e := actual - pr.Finish().ET
			z = append(z, e/pr.Finish().SD)
			if p.InDay == 0 {
				first = append(first, e)
			} else {
				later = append(later, e)
			}
		}
		fmt.Printf("%-30s bias first %+.4f later %+.4f | z sd %.2f\n", w.Car.Name, meanOf(first), meanOf(later), math.Sqrt(variance(z)))
	}
}
