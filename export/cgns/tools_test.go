package cgns

import (
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
)

// tool returns the path of a reference tool from Debian (cgns-convert,
// hdf5-tools). A missing tool skips the test on a developer machine and
// fails it under CI=true.
func tool(t *testing.T, name string) string {
	t.Helper()
	p, err := exec.LookPath(name)
	if err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatalf("reference tool %s is missing (install cgns-convert and hdf5-tools): %v", name, err)
		}
		t.Skipf("reference tool %s is missing: %v", name, err)
	}
	return p
}

// cgnscheck runs the CGNS library's checker (Debian cgns-convert) with
// every warning level on, fails the test on any error or warning and
// returns its report.
func cgnscheck(t *testing.T, path string) string {
	t.Helper()
	out, err := exec.Command(tool(t, "cgnscheck"), "-w3", path).CombinedOutput()
	text := string(out)
	if err != nil {
		t.Fatalf("cgnscheck %s: %v\n%s", path, err, text)
	}
	for _, line := range strings.Split(text, "\n") {
		if strings.Contains(line, "WARNING") || strings.Contains(line, "ERROR") || strings.Contains(line, "warnings (") || strings.Contains(line, "errors (") {
			t.Fatalf("cgnscheck %s reports problems:\n%s", path, text)
		}
	}
	if !strings.Contains(text, "checking complete") {
		t.Fatalf("cgnscheck %s did not complete:\n%s", path, text)
	}
	return text
}

// h5dump reads the whole file with the HDF5 library's own dump tool
// (Debian hdf5-tools) and returns its output.
func h5dump(t *testing.T, path string, args ...string) string {
	t.Helper()
	out, err := exec.Command(tool(t, "h5dump"), append(args, path)...).CombinedOutput()
	if err != nil {
		t.Fatalf("h5dump %s: %v\n%.2000s", path, err, out)
	}
	return string(out)
}

// libraryReader compiles readerC against the CGNS library with the C
// compiler cgo uses and returns a function that runs it on a file and
// returns its lines: what the library's own mid-level calls read back
// (cg_equationset_read, cg_governing_read, cg_model_read, cg_boco_info,
// cg_dataset_read, cg_array_read_as, cg_dataclass_read,
// cg_exponents_read), independent of this package's reader.
func libraryReader(t *testing.T) func(path string) []string {
	t.Helper()
	dir := t.TempDir()
	src := filepath.Join(dir, "read.c")
	if err := os.WriteFile(src, []byte(readerC), 0o644); err != nil {
		t.Fatal(err)
	}
	bin := compileC(t, src, "the CGNS reader")
	return func(path string) []string {
		t.Helper()
		out, err := exec.Command(bin, path).CombinedOutput()
		if err != nil {
			t.Fatalf("read %s with the CGNS library: %v\n%s", path, err, out)
		}
		return strings.Split(strings.TrimSpace(string(out)), "\n")
	}
}

// readerC is the C program of libraryReader. Its lines:
//
//	dimension N
//	equations GOVERNING | equations none
//	model LABEL TYPE
//	param LABEL NAME VALUE CLASS [E1 .. E5]
//	reference ReferenceState NAME VALUE CLASS [E1 .. E5] | reference none
//	bc ZONE BC BCTYPE FAMILY NDATASETS
//	set ZONE BC DATASET BCTYPESIMPLE DIRICHLET NEUMANN
//	value ZONE BC NAME VALUE CLASS [E1 .. E5]
//
// CLASS is the array's own DataClass or "-" when it has none (it then
// inherits the base's); the exponents are there when the array has them.
const readerC = `/* Reads a CGNS file with the CGNS library's mid-level calls and prints,
   one line each: the flow equation set, its models and their parameters,
   whether a ReferenceState is there, and every BC with its FamilyName, its BCDataSet_t
   nodes and their DirichletData values (name, value, DataClass,
   DimensionalExponents). */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <cgnslib.h>

static int fn;

static void die(const char *what) {
	fprintf(stderr, "%s: %s\n", what, cg_get_error());
	exit(1);
}
#define CK(x) do { if ((x) != CG_OK) die(#x); } while (0)

/* arrays prints every DataArray_t under the node at path, each as
   "tag prefix name value class e1 .. e5". */
static void arrays(const char *tag, const char *prefix, const char *path) {
	int n;
	if (cg_gopath(fn, path) != CG_OK) die(path);
	CK(cg_narrays(&n));
	for (int a = 1; a <= n; a++) {
		char name[33], sub[1024];
		CGNS_ENUMT(DataType_t) dt;
		int dim;
		cgsize_t dims[12];
		double v;
		CGNS_ENUMT(DataClass_t) dc;
		double e[5];
		if (cg_gopath(fn, path) != CG_OK) die(path);
		CK(cg_array_info(a, name, &dt, &dim, dims));
		if (dim != 1 || dims[0] != 1) {
			fprintf(stderr, "%s/%s has %d dimensions, first %ld; want one value\n", path, name, dim, (long)dims[0]);
			exit(1);
		}
		CK(cg_array_read_as(a, CGNS_ENUMV(RealDouble), &v));
		printf("%s %s %s %.17g", tag, prefix, name, v);
		snprintf(sub, sizeof sub, "%s/%s", path, name);
		if (cg_gopath(fn, sub) != CG_OK) die(sub);
		if (cg_dataclass_read(&dc) == CG_OK)
			printf(" %s", cg_DataClassName(dc));
		else
			printf(" -");
		if (cg_exponents_info(&dt) == CG_OK) {
			CK(cg_exponents_read(e));
			for (int k = 0; k < 5; k++)
				printf(" %g", e[k]);
		}
		printf("\n");
	}
}

int main(int argc, char **argv) {
	char base[33], path[1024];
	int cell, phys, nz;
	if (argc != 2) {
		fprintf(stderr, "usage: %s FILE.cgns\n", argv[0]);
		return 2;
	}
	if (cg_open(argv[1], CG_MODE_READ, &fn) != CG_OK) die(argv[1]);
	CK(cg_base_read(fn, 1, base, &cell, &phys));
	CK(cg_goto(fn, 1, "end"));
	int eqdim, gov, gas, visc, cond, closure, turb;
	if (cg_equationset_read(&eqdim, &gov, &gas, &visc, &cond, &closure, &turb) == CG_OK) {
		CGNS_ENUMT(GoverningEquationsType_t) gt;
		CGNS_ENUMT(ModelType_t) mt;
		const char *models[] = {"GasModel", "ViscosityModel", "ThermalConductivityModel", "TurbulenceClosure", "TurbulenceModel"};
		int flags[] = {gas, visc, cond, closure, turb};
		CK(cg_goto(fn, 1, "FlowEquationSet_t", 1, "end"));
		printf("dimension %d\n", eqdim);
		if (gov) {
			CK(cg_governing_read(&gt));
			printf("equations %s\n", cg_GoverningEquationsTypeName(gt));
		}
		for (int m = 0; m < 5; m++) {
			char label[64];
			if (!flags[m])
				continue;
			snprintf(label, sizeof label, "%s_t", models[m]);
			CK(cg_goto(fn, 1, "FlowEquationSet_t", 1, "end"));
			CK(cg_model_read(label, &mt));
			printf("model %s %s\n", models[m], cg_ModelTypeName(mt));
			snprintf(path, sizeof path, "/%s/FlowEquationSet/%s", base, models[m]);
			arrays("param", models[m], path);
		}
	} else {
		printf("equations none\n");
	}
	snprintf(path, sizeof path, "/%s/ReferenceState", base);
	if (cg_gopath(fn, path) == CG_OK)
		arrays("reference", "ReferenceState", path);
	else
		printf("reference none\n");
	CK(cg_nzones(fn, 1, &nz));
	for (int z = 1; z <= nz; z++) {
		char zone[33];
		cgsize_t size[9];
		int nb;
		CK(cg_zone_read(fn, 1, z, zone, size));
		CK(cg_nbocos(fn, 1, z, &nb));
		for (int b = 1; b <= nb; b++) {
			char name[33];
			CGNS_ENUMT(BCType_t) bt;
			CGNS_ENUMT(PointSetType_t) pst;
			cgsize_t np, nl;
			int ni[3], nds;
			CGNS_ENUMT(DataType_t) ndt;
			char family[33] = "-";
			CK(cg_boco_info(fn, 1, z, b, name, &bt, &pst, &np, ni, &nl, &ndt, &nds));
			CK(cg_goto(fn, 1, "Zone_t", z, "ZoneBC_t", 1, "BC_t", b, "end"));
			if (cg_famname_read(family) != CG_OK)
				strcpy(family, "-");
			printf("bc %s %s %s %s %d\n", zone, name, cg_BCTypeName(bt), family, nds);
			for (int d = 1; d <= nds; d++) {
				char ds[33], prefix[128];
				CGNS_ENUMT(BCType_t) dt;
				int dir, neu;
				CK(cg_dataset_read(fn, 1, z, b, d, ds, &dt, &dir, &neu));
				printf("set %s %s %s %s %d %d\n", zone, name, ds, cg_BCTypeName(dt), dir, neu);
				if (!dir)
					continue;
				snprintf(path, sizeof path, "/%s/%s/ZoneBC/%s/%s/DirichletData", base, zone, name, ds);
				snprintf(prefix, sizeof prefix, "%s %s", zone, name);
				arrays("value", prefix, path);
			}
		}
	}
	CK(cg_close(fn));
	return 0;
}
`

// compileC compiles the C source file src against the CGNS library, with
// the C compiler cgo uses, into a program beside it, and returns its path;
// what names the program in a failure.
func compileC(t *testing.T, src, what string) string {
	t.Helper()
	cc := "cc"
	if out, err := exec.Command("go", "env", "CC").Output(); err == nil && strings.TrimSpace(string(out)) != "" {
		cc = strings.Fields(string(out))[0]
	}
	cc = tool(t, cc)
	bin := filepath.Join(t.TempDir(), strings.TrimSuffix(filepath.Base(src), ".c"))
	if out, err := exec.Command(cc, "-Wall", "-o", bin, src, "-lcgns").CombinedOutput(); err != nil {
		t.Fatalf("compile %s: %v\n%s", what, err, out)
	}
	return bin
}
