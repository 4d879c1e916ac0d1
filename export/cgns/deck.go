package cgns

/*
#include <cgnslib.h>
*/
import "C"

import (
	"fmt"
	"math"
	"strings"

	"cvdeck/mesh"
)

// Deck is everything written to one CGNS file: the mesh, its boundary
// conditions, the reference flow state and per-cell fields. It is a plain
// struct of its own so this package does not depend on the packages that
// produce those values; the deck package fills it.
type Deck struct {
	// Mesh is the mesh to write. If Mesh.Blocks is empty, or Unstructured
	// is set, it is written as one unstructured zone, otherwise as one
	// structured zone per block.
	Mesh *mesh.Mesh
	// Unstructured writes a structured mesh as one unstructured zone of
	// QUAD_4 cells, for solvers that read only unstructured zones.
	Unstructured bool
	// Name is the CGNS base name (at most 32 characters, no '/');
	// "Base" if empty.
	Name string
	// BCs gives the boundary condition of every boundary tag of the mesh
	// that is not in a periodic pair; a periodic tag takes none.
	BCs []BC
	// BCData are the values of the boundary conditions that have any, at
	// most one entry per tag.
	BCData []BCData
	// Periodic are the periodic pairs of boundary tags, written as
	// connectivity with a Periodic_t translation rather than as BCs: in
	// an unstructured zone as two Abutting1to1 GridConnectivity_t (see
	// (*writer).unstructuredPeriodic), in structured zones as 1-to-1
	// periodic joins of whole block sides (see structuredPeriodic).
	Periodic []Periodic
	// Flow is the gas model, equation set and reference (free-stream)
	// state; nil writes neither FlowEquationSet nor ReferenceState, and
	// FlowState.EquationsOnly writes the FlowEquationSet alone.
	Flow *FlowState
	// CellFields are per-cell values (quality metrics), written as a
	// FlowSolution at CellCenter.
	CellFields []Field
	// FieldsInFlowSolution writes CellFields as the FlowSolution_t
	// "CellQuality" (for viewers that read only flow solutions) instead of
	// the DiscreteData_t "CellQuality". SIDS meant DiscreteData_t for field
	// data that is not part of the flow solution, and cgnscheck warns "not
	// a CGNS data-name identifier" for every non-SIDS name in a
	// FlowSolution_t, so the default keeps the file free of warnings.
	FieldsInFlowSolution bool
}

// BC is the boundary condition of one boundary tag.
type BC struct {
	// Tag is the mesh boundary tag.
	Tag string
	// BCType is a CGNS BCType_t name such as "BCWallViscousHeatFlux",
	// "BCFarfield", "BCSymmetryPlane", "BCInflowSubsonic".
	BCType string
}

// BCData are the values the condition of one boundary tag imposes (a wall
// temperature, an inflow's total state and direction, a back pressure).
// They are written under every BC_t of the tag as the BCDataSet_t
// "Values" with BCTypeSimple the tag's BCType and one BCData_t
// DirichletData holding a DataArray_t of length 1 (global data, SIDS 9.4)
// per value, with its DataClass or DimensionalExponents.
type BCData struct {
	// Tag is the mesh boundary tag; it must have a BC in Deck.BCs.
	Tag string
	// Values are the tag's values, written in this order; names are SIDS
	// data-name identifiers (see BCDataNames), each used once.
	Values []BCValue
}

// BCValue is one value of a boundary condition.
type BCValue struct {
	// Name is a SIDS data-name identifier such as "Temperature",
	// "PressureStagnation" or "VelocityUnitVectorX" (see BCDataNames).
	Name string
	// Value is the value in SI units (those of the base's
	// DimensionalUnits).
	Value float64
}

// FlowState is the gas model, the governing equations and the free
// stream, all values SI.
type FlowState struct {
	// EquationsOnly writes the FlowEquationSet alone, for a case whose gas
	// is known but which has no free stream; the free-stream fields (Mach
	// to ReynoldsLength, Viscosity aside) must then be zero, and a viscous
	// flow needs Sutherland (or a Viscosity for ViscosityModel Constant).
	EquationsOnly bool
	// Gamma is the ratio of specific heats (SpecificHeatRatio), > 1.
	Gamma float64
	// GasConstant is the specific gas constant R in J/(kg K)
	// (IdealGasConstant).
	GasConstant float64
	Mach        float64
	Pressure    float64    // Pa
	Temperature float64    // K
	Density     float64    // kg/m³
	Velocity    [2]float64 // m/s
	// SpeedOfSound is the free-stream speed of sound in m/s
	// (VelocitySound).
	SpeedOfSound float64
	// Viscosity is the free-stream dynamic viscosity in Pa s
	// (ViscosityMolecular); written when Viscous, in the ReferenceState
	// and, without Sutherland, as the ViscosityModel Constant.
	Viscosity float64
	// Reynolds is the free-stream Reynolds number based on ReynoldsLength.
	Reynolds float64
	// ReynoldsLength is the reference length of Reynolds in m
	// (LengthReference); written when > 0.
	ReynoldsLength float64
	// Viscous selects GoverningEquations NSLaminar instead of Euler.
	Viscous bool
	// Turbulent, on a viscous flow, selects GoverningEquations
	// NSTurbulent instead of NSLaminar. No TurbulenceClosure or
	// TurbulenceModel is written: SIDS makes them optional, and the
	// choice of model is the solver user's.
	Turbulent bool
	// Sutherland, if set on a viscous deck, is written as ViscosityModel
	// SutherlandLaw; a viscous deck without it gets ViscosityModel Constant.
	Sutherland *Sutherland
	// Prandtl, if > 0 on a viscous deck, is written as
	// ThermalConductivityModel ConstantPrandtl.
	Prandtl float64
}

// Sutherland holds the constants of Sutherland's law
// μ = μref (T/Tref)^(3/2) (Tref + S)/(T + S) (White, Viscous Fluid Flow).
type Sutherland struct {
	ViscosityRef   float64 // μref, Pa s
	TemperatureRef float64 // Tref, K
	Constant       float64 // S, K
}

// Field is one per-cell array, such as a quality metric.
type Field struct {
	// Name is the array name (at most 32 characters, no '/').
	Name string
	// Values has one value per mesh cell, in cell order.
	Values []float64
	// Exponents are the SI dimensional exponents (mass, length, time,
	// temperature, angle) of the values; all zero marks a dimensionless
	// metric (DataClass NondimensionalParameter). A cell area has
	// {0, 2, 0, 0, 0}.
	Exponents [5]float64
	// Degrees marks angle values in degrees: the array then carries its
	// own DimensionalUnits with AngleUnits Degree, overriding the base's
	// Radian (SIDS lets a DataArray_t hold DimensionalUnits of its own).
	// It needs an angle exponent.
	Degrees bool
}

// checkName reports whether s can be a CGNS node name: non-empty, at most
// 32 characters, no '/'.
func checkName(what, s string) error {
	switch {
	case s == "":
		return fmt.Errorf("%s is empty; a CGNS node name needs 1 to %d characters", what, maxNameLen)
	case len(s) > maxNameLen:
		return fmt.Errorf("%s %q has %d characters; CGNS node names have at most %d", what, s, len(s), maxNameLen)
	case strings.ContainsRune(s, '/'):
		return fmt.Errorf("%s %q contains '/', which CGNS node names may not", what, s)
	case s == "." || s == "..":
		return fmt.Errorf("%s %q is not a valid CGNS node name", what, s)
	}
	return nil
}

// plan is what validation works out before anything is written: the
// BCType and BC data of every mesh tag, in tag order (periodicTag and no
// data for the tags of a periodic pair), and the periodic joins of a
// structured deck.
type plan struct {
	bcTypes []C.BCType_t
	bcData  [][]BCValue
	joins   []periodicJoin
}

// validate checks the deck before anything is written.
func (d *Deck) validate() (*plan, error) {
	if d == nil || d.Mesh == nil {
		return nil, fmt.Errorf("cgns: deck has no mesh")
	}
	types, data, err := d.validateTags()
	if err != nil {
		return nil, err
	}
	pl := &plan{bcTypes: types, bcData: data}
	if d.structured() {
		if pl.joins, err = structuredPeriodic(d.Mesh, d.Periodic); err != nil {
			return nil, fmt.Errorf("cgns: %w", err)
		}
	}
	return pl, nil
}

// validateTags checks everything but the structured periodic joins and
// returns the BCType and BC data of every mesh tag (see plan).
func (d *Deck) validateTags() ([]C.BCType_t, [][]BCValue, error) {
	m := d.Mesh
	if m.NumCells() == 0 {
		return nil, nil, fmt.Errorf("cgns: mesh has no cells")
	}
	if err := checkName("base name", d.baseName()); err != nil {
		return nil, nil, fmt.Errorf("cgns: %w", err)
	}
	nn, nc, nf := int64(len(m.Nodes)), int64(m.NumCells()), int64(m.NumFaces())
	if nn > maxIndex || nc+nf > maxIndex || int64(len(m.CellNodes))+nc > maxIndex || 4*nf > maxIndex {
		return nil, nil, fmt.Errorf("cgns: mesh has %d nodes, %d cells and %d faces; this CGNS build (cgsize_t of 32 bits) numbers elements, nodes and array entries up to %d", nn, nc, nf, maxIndex)
	}
	if d.structured() {
		if err := validateBlocks(m); err != nil {
			return nil, nil, fmt.Errorf("cgns: %w", err)
		}
	}
	byTag := make(map[string]string, len(d.BCs))
	dataOf := make(map[string][]BCValue, len(d.BCData))
	for i, bc := range d.BCs {
		if _, ok := byTag[bc.Tag]; ok {
			return nil, nil, fmt.Errorf("cgns: BC %d: tag %q has more than one boundary condition", i, bc.Tag)
		}
		if _, _, ok := m.TagRange(bc.Tag); !ok {
			return nil, nil, fmt.Errorf("cgns: BC %d: tag %q is not a boundary tag of the mesh; mesh tags are %v", i, bc.Tag, m.Tags)
		}
		byTag[bc.Tag] = bc.BCType
	}
	for i, bd := range d.BCData {
		if _, ok := byTag[bd.Tag]; !ok {
			return nil, nil, fmt.Errorf("cgns: BC data %d: tag %q has no BC to carry its values", i, bd.Tag)
		}
		if _, ok := dataOf[bd.Tag]; ok {
			return nil, nil, fmt.Errorf("cgns: BC data %d: tag %q has values twice", i, bd.Tag)
		}
		if err := validateBCData(bd.Values); err != nil {
			return nil, nil, fmt.Errorf("cgns: BC data of tag %q: %w", bd.Tag, err)
		}
		dataOf[bd.Tag] = bd.Values
	}
	inPair := map[string]int{}
	if err := d.validatePeriodic(byTag, inPair); err != nil {
		return nil, nil, err
	}
	types := make([]C.BCType_t, len(m.Tags))
	data := make([][]BCValue, len(m.Tags))
	for t, tag := range m.Tags {
		if err := checkName("boundary tag", tag); err != nil {
			return nil, nil, fmt.Errorf("cgns: %w", err)
		}
		if reservedZoneChild[tag] || reservedBaseChild[tag] {
			return nil, nil, fmt.Errorf("cgns: boundary tag %q is also the name of a standard CGNS node of the deck; rename the tag", tag)
		}
		if _, ok := inPair[tag]; ok {
			types[t] = periodicTag
			continue
		}
		name, ok := byTag[tag]
		if !ok {
			return nil, nil, fmt.Errorf("cgns: boundary tag %q has no boundary condition; give it a CGNS BCType such as BCWall or BCFarfield, or put it in a periodic pair", tag)
		}
		bt, err := bcTypeByName(name)
		if err != nil {
			return nil, nil, fmt.Errorf("cgns: boundary tag %q: %w", tag, err)
		}
		types[t] = C.BCType_t(bt)
		data[t] = dataOf[tag]
	}
	seen := map[string]bool{}
	for i, f := range d.CellFields {
		if err := checkName(fmt.Sprintf("cell field %d name", i), f.Name); err != nil {
			return nil, nil, fmt.Errorf("cgns: %w", err)
		}
		if f.Name == "GridLocation" || f.Name == "DataClass" || f.Name == "DimensionalUnits" {
			return nil, nil, fmt.Errorf("cgns: cell field %d: name %q is a standard child of the field's parent node; rename the field", i, f.Name)
		}
		if seen[f.Name] {
			return nil, nil, fmt.Errorf("cgns: cell field %d: name %q is used twice", i, f.Name)
		}
		seen[f.Name] = true
		if f.Degrees && f.Exponents[4] == 0 {
			return nil, nil, fmt.Errorf("cgns: cell field %q is marked as degrees but its exponents %v have no angle", f.Name, f.Exponents)
		}
		if len(f.Values) != m.NumCells() {
			return nil, nil, fmt.Errorf("cgns: cell field %q has %d values; the mesh has %d cells", f.Name, len(f.Values), m.NumCells())
		}
	}
	if d.Flow != nil {
		if err := d.Flow.validate(); err != nil {
			return nil, nil, fmt.Errorf("cgns: flow state: %w", err)
		}
	}
	return types, data, nil
}

// validateBCData checks the values of one boundary condition: every name
// a BC data-name identifier of BCDataNames and used once, every value
// finite, positive where the quantity is (pressures, temperatures,
// density, Mach number ≥ 0), and a flow direction a unit vector.
func validateBCData(data []BCValue) error {
	seen := map[string]bool{}
	unit := [2]float64{}
	nUnit := 0
	for _, v := range data {
		q, ok := bcDataName(v.Name)
		if !ok {
			return fmt.Errorf("value %q is not a BC data-name identifier this writer knows; known names: %s", v.Name, strings.Join(BCDataNames(), ", "))
		}
		if seen[v.Name] {
			return fmt.Errorf("value %q is given twice", v.Name)
		}
		seen[v.Name] = true
		switch {
		case math.IsNaN(v.Value) || math.IsInf(v.Value, 0):
			return fmt.Errorf("value %s is %g; it must be a finite number", v.Name, v.Value)
		case q.sign > 0 && !(v.Value > 0):
			return fmt.Errorf("value %s is %g; it must be positive", v.Name, v.Value)
		case q.sign == 0 && v.Value < 0:
			return fmt.Errorf("value %s is %g; it must not be negative", v.Name, v.Value)
		}
		switch v.Name {
		case "VelocityUnitVectorX":
			unit[0] = v.Value
			nUnit++
		case "VelocityUnitVectorY":
			unit[1] = v.Value
			nUnit++
		}
	}
	if nUnit == 1 {
		return fmt.Errorf("a flow direction needs both VelocityUnitVectorX and VelocityUnitVectorY")
	}
	if n := math.Hypot(unit[0], unit[1]); nUnit == 2 && math.Abs(n-1) > 1e-9 {
		return fmt.Errorf("flow direction (%g, %g) has length %g; VelocityUnitVectorX and VelocityUnitVectorY make a unit vector", unit[0], unit[1], n)
	}
	return nil
}

// structured reports whether the deck is written as structured zones.
func (d *Deck) structured() bool { return len(d.Mesh.Blocks) > 0 && !d.Unstructured }

func (d *Deck) baseName() string {
	if d.Name == "" {
		return "Base"
	}
	return d.Name
}

// reservedZoneChild are names of standard children of a zone, which
// element sections (named after boundary tags) must not take.
var reservedZoneChild = map[string]bool{
	"GridCoordinates": true, "ZoneBC": true, "ZoneGridConnectivity": true,
	"ZoneType": true, "FlowSolution": true, "CellQuality": true,
	"Cells": true, "InteriorFaces": true, "UntaggedBoundary": true,
	"FamilyName": true, "ReferenceState": true, "FlowEquationSet": true,
}

// reservedBaseChild are names of standard children of the base, which
// families (named after boundary tags) and zones must not take.
var reservedBaseChild = map[string]bool{
	"FlowEquationSet": true, "ReferenceState": true, "DataClass": true,
	"DimensionalUnits": true, "ReferenceStateDescription": true,
}

func (f *FlowState) validate() error {
	if f.Turbulent && !f.Viscous {
		return fmt.Errorf("Turbulent is set on an inviscid flow; NSTurbulent needs Viscous")
	}
	if f.EquationsOnly {
		return f.validateEquations()
	}
	positive := []struct {
		name string
		v    float64
	}{
		{"GasConstant", f.GasConstant}, {"Pressure", f.Pressure},
		{"Temperature", f.Temperature}, {"Density", f.Density},
		{"SpeedOfSound", f.SpeedOfSound},
	}
	if !(f.Gamma > 1) || math.IsInf(f.Gamma, 0) {
		return fmt.Errorf("Gamma is %g; the ratio of specific heats must be greater than 1", f.Gamma)
	}
	for _, p := range positive {
		if !(p.v > 0) || math.IsInf(p.v, 0) {
			return fmt.Errorf("%s is %g; it must be a positive finite number", p.name, p.v)
		}
	}
	finite := []struct {
		name string
		v    float64
	}{
		{"Mach", f.Mach}, {"Velocity[0]", f.Velocity[0]}, {"Velocity[1]", f.Velocity[1]},
		{"Viscosity", f.Viscosity}, {"Reynolds", f.Reynolds}, {"ReynoldsLength", f.ReynoldsLength},
		{"Prandtl", f.Prandtl},
	}
	for _, p := range finite {
		if math.IsNaN(p.v) || math.IsInf(p.v, 0) || p.v < 0 && !strings.HasPrefix(p.name, "Velocity") {
			return fmt.Errorf("%s is %g; it must be a finite number, not negative", p.name, p.v)
		}
	}
	if f.Viscous && !(f.Viscosity > 0) {
		return fmt.Errorf("a viscous flow needs Viscosity > 0, got %g", f.Viscosity)
	}
	return f.validateLaws()
}

// validateEquations checks a FlowState with EquationsOnly: a valid gas and
// viscosity law, and no free-stream value that would silently go unwritten.
func (f *FlowState) validateEquations() error {
	if !(f.Gamma > 1) || math.IsInf(f.Gamma, 0) {
		return fmt.Errorf("Gamma is %g; the ratio of specific heats must be greater than 1", f.Gamma)
	}
	if !(f.GasConstant > 0) || math.IsInf(f.GasConstant, 0) {
		return fmt.Errorf("GasConstant is %g; it must be a positive finite number", f.GasConstant)
	}
	for _, p := range []struct {
		name string
		v    float64
	}{
		{"Mach", f.Mach}, {"Pressure", f.Pressure}, {"Temperature", f.Temperature},
		{"Density", f.Density}, {"Velocity[0]", f.Velocity[0]}, {"Velocity[1]", f.Velocity[1]},
		{"SpeedOfSound", f.SpeedOfSound}, {"Reynolds", f.Reynolds}, {"ReynoldsLength", f.ReynoldsLength},
	} {
		if p.v != 0 {
			return fmt.Errorf("%s is %g, but EquationsOnly writes no ReferenceState; leave it zero or give the reference state", p.name, p.v)
		}
	}
	if math.IsNaN(f.Viscosity) || math.IsInf(f.Viscosity, 0) || f.Viscosity < 0 {
		return fmt.Errorf("Viscosity is %g; it must be a finite number, not negative", f.Viscosity)
	}
	if math.IsNaN(f.Prandtl) || math.IsInf(f.Prandtl, 0) || f.Prandtl < 0 {
		return fmt.Errorf("Prandtl is %g; it must be a finite number, not negative", f.Prandtl)
	}
	if f.Viscous && f.Sutherland == nil && !(f.Viscosity > 0) {
		return fmt.Errorf("a viscous flow without a reference state needs Sutherland constants (or a Viscosity > 0 for a constant viscosity): there is no free-stream temperature to evaluate a viscosity at")
	}
	return f.validateLaws()
}

// validateLaws checks the Sutherland constants, when given.
func (f *FlowState) validateLaws() error {
	if s := f.Sutherland; s != nil && (!(s.ViscosityRef > 0) || !(s.TemperatureRef > 0) || !(s.Constant > 0)) {
		return fmt.Errorf("Sutherland constants must be positive, got μref=%g Tref=%g S=%g", s.ViscosityRef, s.TemperatureRef, s.Constant)
	}
	return nil
}
