package cgns

/*
#include <stdlib.h>
#include <cgnslib.h>
*/
import "C"

import (
	"fmt"
	"os"
	"path/filepath"
	"unsafe"
)

// Write writes the deck to a CGNS/HDF5 file at path and returns the content
// hash (hex SHA-256 of the arrays and names written, in a fixed order; see
// contentHash). The file is written to a temporary file in the same folder
// (".NAME.partial-*", as package export/atomic names them), given mode
// 0644, synced and renamed onto path, so an interrupted run leaves the
// previous file or none, never half of one.
//
// Layout: one base (cell and physical dimension 2) named Deck.Name, with
// DataClass Dimensional and DimensionalUnits SI (Kilogram, Meter, Second,
// Kelvin, Radian), one Family_t per boundary tag (with a FamilyBC, except
// for the tags of periodic pairs), the FlowEquationSet and ReferenceState
// from Deck.Flow (see (*writer).flow), and either one unstructured zone (see
// (*writer).unstructured) or one structured zone per block (see
// (*writer).structured). Periodic pairs are written as connectivity with
// a Periodic_t (see Periodic).
func Write(path string, d *Deck) (string, error) {
	pl, err := d.validate()
	if err != nil {
		return "", err
	}
	dir, base := filepath.Split(path)
	if dir == "" {
		dir = "."
	}
	tmpf, err := os.CreateTemp(dir, "."+base+".partial-*")
	if err != nil {
		return "", fmt.Errorf("cgns: create temporary file beside %s: %w", path, err)
	}
	tmp := tmpf.Name()
	tmpf.Close()
	// Only the library calls are serialised; the sync and rename of the
	// finished file run outside the lock, so parallel decks overlap them.
	libMu.Lock()
	sum, err := writeFile(tmp, d, pl)
	libMu.Unlock()
	if err == nil {
		err = syncFile(tmp)
	}
	if err == nil {
		err = os.Rename(tmp, path)
	}
	if err != nil {
		os.Remove(tmp)
		return "", fmt.Errorf("cgns: write %s: %w", path, err)
	}
	syncDir(dir)
	return sum, nil
}

// syncFile sets the finished file's mode and flushes it to disk.
func syncFile(path string) error {
	f, err := os.OpenFile(path, os.O_RDWR, 0)
	if err != nil {
		return err
	}
	err = f.Chmod(0o644)
	if err == nil {
		err = f.Sync()
	}
	if err != nil {
		f.Close()
		return err
	}
	return f.Close()
}

// syncDir makes the rename durable; failure only weakens durability after
// a power loss, so it is not reported.
func syncDir(dir string) {
	if f, err := os.Open(dir); err == nil {
		f.Sync()
		f.Close()
	}
}

// writer holds the open file and the running content hash.
type writer struct {
	fn   C.int
	b    C.int
	base string
	sum  *contentHash
}

func writeFile(path string, d *Deck, pl *plan) (string, error) {
	if err := libError(C.cg_set_file_type(C.CG_FILE_HDF5), "select HDF5 storage"); err != nil {
		return "", err
	}
	p := cstr(path)
	defer free(p)
	w := &writer{base: d.baseName(), sum: newContentHash()}
	if err := libError(C.cg_open(p, C.CG_MODE_WRITE, &w.fn), "open "+path); err != nil {
		return "", err
	}
	err := w.deck(d, pl)
	if cerr := libError(C.cg_close(w.fn), "close "+path); err == nil {
		err = cerr
	}
	if err != nil {
		return "", err
	}
	return w.sum.sum(), nil
}

func (w *writer) deck(d *Deck, pl *plan) error {
	bcTypes := pl.bcTypes
	name := cstr(w.base)
	defer free(name)
	if err := libError(C.cg_base_write(w.fn, name, 2, 2, &w.b), "write base "+w.base); err != nil {
		return err
	}
	w.sum.text("/"+w.base, "CGNSBase_t 2 2")
	if err := w.units(); err != nil {
		return err
	}
	if err := w.families(d.Mesh.Tags, bcTypes); err != nil {
		return err
	}
	if d.Flow != nil {
		if err := w.flow(d.Flow); err != nil {
			return err
		}
	}
	if d.structured() {
		return w.structured(d, pl)
	}
	return w.unstructured(d, pl)
}

// units writes DataClass Dimensional and SI DimensionalUnits at the base;
// every array below inherits them.
func (w *writer) units() error {
	if err := gopath(w.fn, "/"+w.base); err != nil {
		return err
	}
	if err := libError(C.cg_dataclass_write(C.Dimensional), "write DataClass at /"+w.base); err != nil {
		return err
	}
	w.sum.text("/"+w.base+"/DataClass", "Dimensional")
	w.sum.text("/"+w.base+"/DimensionalUnits", "Kilogram Meter Second Kelvin Radian")
	return libError(C.cg_units_write(C.Kilogram, C.Meter, C.Second, C.Kelvin, C.Radian), "write DimensionalUnits at /"+w.base)
}

// families writes one Family_t per boundary tag, each with a FamilyBC of
// the tag's BCType, so BCs can refer to their tag by FamilyName; the
// family of a periodic tag has no FamilyBC, its faces being connectivity.
func (w *writer) families(tags []string, bcTypes []C.BCType_t) error {
	for t, tag := range tags {
		name := cstr(tag)
		var f, bc C.int
		err := libError(C.cg_family_write(w.fn, w.b, name, &f), "write family /"+w.base+"/"+tag)
		if bcTypes[t] == periodicTag {
			free(name)
			if err != nil {
				return err
			}
			w.sum.text("/"+w.base+"/"+tag, "Family_t")
			continue
		}
		if err == nil {
			fb := cstr("FamBC")
			err = libError(C.cg_fambc_write(w.fn, w.b, f, fb, bcTypes[t], &bc), "write FamilyBC of family "+tag)
			free(fb)
		}
		free(name)
		if err != nil {
			return err
		}
		w.sum.text("/"+w.base+"/"+tag+"/FamBC", bcTypeName(bcTypes[t]))
	}
	return nil
}

// zone creates a zone of the given type and size (cg_zone_write).
func (w *writer) zone(name string, typ C.ZoneType_t, size []int32) (C.int, error) {
	n := cstr(name)
	defer free(n)
	var z C.int
	err := libError(C.cg_zone_write(w.fn, w.b, n, ip(size), typ, &z), "write zone /"+w.base+"/"+name)
	w.sum.ints("/"+w.base+"/"+name, size)
	return z, err
}

// coords writes CoordinateX and CoordinateY of a zone.
func (w *writer) coords(z C.int, zone string, x, y []float64) error {
	for _, c := range []struct {
		name string
		v    []float64
	}{{"CoordinateX", x}, {"CoordinateY", y}} {
		n := cstr(c.name)
		var ci C.int
		err := libError(C.cg_coord_write(w.fn, w.b, z, C.RealDouble, n, unsafe.Pointer(&c.v[0]), &ci),
			"write /"+w.base+"/"+zone+"/GridCoordinates/"+c.name)
		free(n)
		if err != nil {
			return err
		}
		path := "/" + w.base + "/" + zone + "/GridCoordinates/" + c.name
		w.sum.floats(path, c.v)
		if err := w.exponents(path, expLength); err != nil {
			return err
		}
	}
	return nil
}

// exponents writes the DimensionalExponents of the array at path.
func (w *writer) exponents(path string, e [5]float64) error {
	if err := gopath(w.fn, path); err != nil {
		return err
	}
	w.sum.floats(path+"/DimensionalExponents", e[:])
	return libError(C.cg_exponents_write(C.RealDouble, unsafe.Pointer(&e[0])), "write DimensionalExponents of "+path)
}

// dimensionless marks the array at path as a NondimensionalParameter.
func (w *writer) dimensionless(path string) error {
	if err := gopath(w.fn, path); err != nil {
		return err
	}
	w.sum.text(path+"/DataClass", "NondimensionalParameter")
	return libError(C.cg_dataclass_write(C.NondimensionalParameter), "write DataClass of "+path)
}

// familyName writes a FamilyName child under the node at path.
func (w *writer) familyName(path, family string) error {
	if err := gopath(w.fn, path); err != nil {
		return err
	}
	f := cstr(family)
	defer free(f)
	w.sum.text(path+"/FamilyName", family)
	return libError(C.cg_famname_write(f), "write FamilyName at "+path)
}

// cellFields writes the per-cell fields of one zone at CellCenter, as the
// DiscreteData_t "CellQuality" or, with Deck.FieldsInFlowSolution, the
// FlowSolution_t "CellQuality"; values(f) gives field f in the zone's cell
// order and dims the zone's cell dimensions (one for an unstructured zone,
// (NI-1, NJ-1) for a structured one).
func (w *writer) cellFields(z C.int, zone string, d *Deck, dims []int32, values func(f int) []float64) error {
	if len(d.CellFields) == 0 {
		return nil
	}
	path := "/" + w.base + "/" + zone + "/CellQuality"
	n := cstr("CellQuality")
	defer free(n)
	var s C.int
	if d.FieldsInFlowSolution {
		if err := libError(C.cg_sol_write(w.fn, w.b, z, n, C.CellCenter, &s), "write FlowSolution "+path); err != nil {
			return err
		}
		w.sum.text(path, "FlowSolution_t CellCenter")
	} else {
		if err := libError(C.cg_discrete_write(w.fn, w.b, z, n, &s), "write DiscreteData "+path); err != nil {
			return err
		}
		if err := gopath(w.fn, path); err != nil {
			return err
		}
		if err := libError(C.cg_gridlocation_write(C.CellCenter), "write GridLocation of "+path); err != nil {
			return err
		}
		w.sum.text(path, "DiscreteData_t CellCenter")
	}
	for i, f := range d.CellFields {
		v := values(i)
		fname := cstr(f.Name)
		var err error
		if d.FieldsInFlowSolution {
			var fi C.int
			err = libError(C.cg_field_write(w.fn, w.b, z, s, C.RealDouble, fname, unsafe.Pointer(&v[0]), &fi), "write "+path+"/"+f.Name)
		} else if err = gopath(w.fn, path); err == nil {
			err = libError(C.cg_array_write(fname, C.RealDouble, C.int(len(dims)), ip(dims), unsafe.Pointer(&v[0])), "write "+path+"/"+f.Name)
		}
		free(fname)
		if err != nil {
			return err
		}
		fp := path + "/" + f.Name
		w.sum.floats(fp, v)
		if f.Exponents == ([5]float64{}) {
			err = w.dimensionless(fp)
		} else {
			err = w.exponents(fp, f.Exponents)
		}
		if err == nil && f.Degrees {
			w.sum.text(fp+"/DimensionalUnits", "Kilogram Meter Second Kelvin Degree")
			err = libError(C.cg_units_write(C.Kilogram, C.Meter, C.Second, C.Kelvin, C.Degree), "write DimensionalUnits of "+fp)
		}
		if err != nil {
			return err
		}
	}
	return nil
}

// ip passes an int32 slice to the library as cgsize_t* (int in this
// build); nil for an empty slice.
func ip(v []int32) *C.int {
	if len(v) == 0 {
		return nil
	}
	return (*C.int)(unsafe.Pointer(&v[0]))
}
