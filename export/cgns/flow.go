package cgns

/*
#include <cgnslib.h>
*/
import "C"

import (
	"slices"
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

// bcQuantity is what the writer knows of one BC data-name identifier:
// its dimensional exponents (none for a NondimensionalParameter) and its
// sign (+1 positive, 0 not negative, -1 either).
type bcQuantity struct {
	exp           [5]float64
	dimensionless bool
	sign          int
}

// bcQuantities are the SIDS data-name identifiers (SIDS, "Conventions for
// Data-Name Identifiers": flow-solution quantities; VelocityUnitVectorX
// and VelocityUnitVectorY are the components of a flow direction) that a
// boundary condition's values may take. Their dimensions are those the
// CGNS library's cgnsnames tool lists for the same names, which a test
// compares.
var bcQuantities = map[string]bcQuantity{
	"Pressure":              {exp: expPressure, sign: 1},
	"PressureStagnation":    {exp: expPressure, sign: 1},
	"Temperature":           {exp: expTemperature, sign: 1},
	"TemperatureStagnation": {exp: expTemperature, sign: 1},
	"Density":               {exp: expDensity, sign: 1},
	"VelocityX":             {exp: expVelocity, sign: -1},
	"VelocityY":             {exp: expVelocity, sign: -1},
	"VelocityUnitVectorX":   {dimensionless: true, sign: -1},
	"VelocityUnitVectorY":   {dimensionless: true, sign: -1},
	"Mach":                  {dimensionless: true, sign: 0},
}

// BCDataNames lists, sorted, the data-name identifiers a BCValue may have.
func BCDataNames() []string {
	names := make([]string, 0, len(bcQuantities))
	for n := range bcQuantities {
		names = append(names, n)
	}
	slices.Sort(names)
	return names
}

func bcDataName(name string) (bcQuantity, bool) {
	q, ok := bcQuantities[name]
	return q, ok
}

// bcDataSet writes the values of the BC at path (index bc of zone z) as
// the BCDataSet_t "Values" with BCTypeSimple typ and one BCData_t
// DirichletData (SIDS 9.3 and 9.4: a DataArray_t of length 1 is global
// data, the same on every face of the BC).
func (w *writer) bcDataSet(z, bc C.int, path string, typ C.BCType_t, data []BCValue) error {
	if len(data) == 0 {
		return nil
	}
	n := cstr(bcDataSetName)
	defer free(n)
	var ds C.int
	if err := libError(C.cg_dataset_write(w.fn, w.b, z, bc, n, typ, &ds), "write BCDataSet "+path+"/"+bcDataSetName); err != nil {
		return err
	}
	if err := libError(C.cg_bcdata_write(w.fn, w.b, z, bc, ds, C.Dirichlet), "write DirichletData of "+path+"/"+bcDataSetName); err != nil {
		return err
	}
	w.sum.text(path+"/"+bcDataSetName, bcTypeName(typ)+" DirichletData")
	vals := make([]scalar, len(data))
	for i, v := range data {
		q, _ := bcDataName(v.Name)
		vals[i] = scalar{name: v.Name, v: v.Value, exp: q.exp, dimensionless: q.dimensionless}
	}
	return w.scalars(path+"/"+bcDataSetName+"/DirichletData", vals)
}

// bcDataSetName is the name of the BCDataSet_t of every BC with values.
const bcDataSetName = "Values"

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

// flow writes the base's FlowEquationSet (see equationSet) and, unless
// f.EquationsOnly, its ReferenceState with the free stream (names from
// the SIDS data-name conventions, section "Conventions for Data-Name
// Identifiers").
func (w *writer) flow(f *FlowState) error {
	if err := w.equationSet(f); err != nil {
		return err
	}
	if f.EquationsOnly {
		return nil
	}
	bp := "/" + w.base
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

// equationSet writes the base's FlowEquationSet (SIDS 10.1):
// EquationDimension 2; GoverningEquations Euler, or for a viscous flow
// NSLaminar, NSTurbulent when f.Turbulent; GasModel Ideal with
// SpecificHeatRatio and IdealGasConstant; and for a viscous flow a
// ViscosityModel (SutherlandLaw with its three constants, or Constant at
// f.Viscosity) and, when f.Prandtl > 0, ThermalConductivityModel
// ConstantPrandtl with its Prandtl number.
func (w *writer) equationSet(f *FlowState) error {
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
	switch {
	case f.Viscous && f.Turbulent:
		gov, govName = C.NSTurbulent, "NSTurbulent"
	case f.Viscous:
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
	if !f.Viscous {
		return nil
	}
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
		return w.model(es, "ThermalConductivityModel", C.ConstantPrandtl, "ConstantPrandtl", []scalar{
			{name: "Prandtl", v: f.Prandtl, dimensionless: true},
		})
	}
	return nil
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
