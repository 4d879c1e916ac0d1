package cgns

/*
#include <cgnslib.h>
*/
import "C"

import (
	"unsafe"
)

// Dimensional exponents (mass, length, time, temperature, angle) of the
// quantities written, from their SI units.
var (
	expPressure    = [5]float64{1, -1, -2, 0, 0} // Pa = kg m⁻¹ s⁻²
	expTemperature = [5]float64{0, 0, 0, 1, 0}   // K
	expDensity     = [5]float64{1, -3, 0, 0, 0}  // kg m⁻³
	expVelocity    = [5]float64{0, 1, -1, 0, 0}  // m s⁻¹
	expViscosity   = [5]float64{1, -1, -1, 0, 0} // Pa s = kg m⁻¹ s⁻¹
	expGasConstant = [5]float64{0, 2, -2, -1, 0} // J kg⁻¹ K⁻¹ = m² s⁻² K⁻¹
	expLength      = [5]float64{0, 1, 0, 0, 0}   // m
	expAngle       = [5]float64{0, 0, 0, 0, 1}   // rad
)

// scalar is one named value written as a DataArray_t of length 1.
type scalar struct {
	name string
	v    float64
	exp  [5]float64
	// dimensionless marks a NondimensionalParameter (Mach, Reynolds, γ).
	dimensionless bool
}

// scalars writes each value as a DataArray_t under the node at path, with
// its DataClass and, for dimensional values, DimensionalExponents.
func (w *writer) scalars(path string, vals []scalar) error {
	for _, s := range vals {
		if err := gopath(w.fn, path); err != nil {
			return err
		}
		n := cstr(s.name)
		dim := [1]int32{1}
		v := s.v
		err := libError(C.cg_array_write(n, C.RealDouble, 1, ip(dim[:]), unsafe.Pointer(&v)), "write "+path+"/"+s.name)
		free(n)
		if err != nil {
			return err
		}
		w.sum.floats(path+"/"+s.name, []float64{v})
		if s.dimensionless {
			err = w.dimensionless(path + "/" + s.name)
		} else {
			err = w.exponents(path+"/"+s.name, s.exp)
		}
		if err != nil {
			return err
		}
	}
	return nil
}

// flow writes the base's FlowEquationSet (EquationDimension 2,
// GoverningEquations Euler or NSLaminar, GasModel Ideal with
// SpecificHeatRatio and IdealGasConstant, and for viscous flow a
// ViscosityModel and optional ThermalConductivityModel) and its
// ReferenceState with the free stream (names from the SIDS data-name
// conventions, section "Conventions for Data-Name Identifiers").
func (w *writer) flow(f *FlowState) error {
	bp := "/" + w.base
	if err := gopath(w.fn, bp); err != nil {
		return err
	}
	if err := libError(C.cg_equationset_write(2), "write "+bp+"/FlowEquationSet"); err != nil {
		return err
	}
	es := bp + "/FlowEquationSet"
	if err := gopath(w.fn, es); err != nil {
		return err
	}
	gov, govName := C.GoverningEquationsType_t(C.Euler), "Euler"
	if f.Viscous {
		gov, govName = C.NSLaminar, "NSLaminar"
	}
	if err := libError(C.cg_governing_write(gov), "write "+es+"/GoverningEquations"); err != nil {
		return err
	}
	w.sum.text(es+"/GoverningEquations", govName)
	if err := w.model(es, "GasModel", C.Ideal, "Ideal", []scalar{
		{name: "SpecificHeatRatio", v: f.Gamma, dimensionless: true},
		{name: "IdealGasConstant", v: f.GasConstant, exp: expGasConstant},
	}); err != nil {
		return err
	}
	if f.Viscous {
		if s := f.Sutherland; s != nil {
			if err := w.model(es, "ViscosityModel", C.SutherlandLaw, "SutherlandLaw", []scalar{
				{name: "SutherlandLawConstant", v: s.Constant, exp: expTemperature},
				{name: "TemperatureReference", v: s.TemperatureRef, exp: expTemperature},
				{name: "ViscosityMolecularReference", v: s.ViscosityRef, exp: expViscosity},
			}); err != nil {
				return err
			}
		} else if err := w.model(es, "ViscosityModel", C.Constant, "Constant", []scalar{
			{name: "ViscosityMolecular", v: f.Viscosity, exp: expViscosity},
		}); err != nil {
			return err
		}
		if f.Prandtl > 0 {
			if err := w.model(es, "ThermalConductivityModel", C.ConstantPrandtl, "ConstantPrandtl", []scalar{
				{name: "Prandtl", v: f.Prandtl, dimensionless: true},
			}); err != nil {
				return err
			}
		}
	}

	if err := gopath(w.fn, bp); err != nil {
		return err
	}
	desc := cstr("Free stream")
	err := libError(C.cg_state_write(desc), "write "+bp+"/ReferenceState")
	free(desc)
	if err != nil {
		return err
	}
	vals := []scalar{
		{name: "Mach", v: f.Mach, dimensionless: true},
		{name: "Pressure", v: f.Pressure, exp: expPressure},
		{name: "Temperature", v: f.Temperature, exp: expTemperature},
		{name: "Density", v: f.Density, exp: expDensity},
		{name: "VelocityX", v: f.Velocity[0], exp: expVelocity},
		{name: "VelocityY", v: f.Velocity[1], exp: expVelocity},
		{name: "VelocitySound", v: f.SpeedOfSound, exp: expVelocity},
	}
	if f.Viscous {
		vals = append(vals, scalar{name: "ViscosityMolecular", v: f.Viscosity, exp: expViscosity})
	}
	if f.Reynolds > 0 {
		vals = append(vals, scalar{name: "Reynolds", v: f.Reynolds, dimensionless: true})
	}
	if f.ReynoldsLength > 0 {
		vals = append(vals, scalar{name: "LengthReference", v: f.ReynoldsLength, exp: expLength})
	}
	return w.scalars(bp+"/ReferenceState", vals)
}

// model writes one model node (label e.g. "GasModel_t") under the equation
// set at es with its parameters.
func (w *writer) model(es, name string, typ C.ModelType_t, typName string, params []scalar) error {
	if err := gopath(w.fn, es); err != nil {
		return err
	}
	label := cstr(name + "_t")
	err := libError(C.cg_model_write(label, typ), "write "+es+"/"+name)
	free(label)
	if err != nil {
		return err
	}
	w.sum.text(es+"/"+name, typName)
	return w.scalars(es+"/"+name, params)
}
