package vtk

import (
	"bytes"
	"encoding/base64"
	"fmt"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"
)

// A file cut short is refused, wherever the cut falls: the VTK file-format
// specification ("VTK File Formats", XML File Formats) has every DataArray
// of a file hold the data it declares (inline, or at its offset in the
// AppendedData element) and the file close its VTKFile root element, so
// a file missing any of its bytes but trailing whitespace is not a VTK
// file. These tests cut real files, cvdeck's and the VTK library's own, at
// many offsets.

// vtkEncodingsScript has the VTK library build a small 2D grid of its own
// (triangles, quads, tagged boundary lines, a point-data and a cell-data
// array the readers do not need, a String field-data array) and write it
// with vtkXMLUnstructuredGridWriter, and the same cells as PolyData with
// vtkXMLPolyDataWriter, in every data mode it has (ascii; inline binary;
// appended raw and base64), uncompressed and zlib-compressed, with UInt32
// and UInt64 headers. It prints the file names, the points and the cell
// count of each kind.
const vtkEncodingsScript = `
import sys, json, vtk
out = sys.argv[1]
pts = vtk.vtkPoints(); pts.SetDataTypeToDouble()
nx, ny = 4, 3
for j in range(ny + 1):
    for i in range(nx + 1):
        pts.InsertNextPoint(i + 0.1 * (j % 2), j, 0.0)
idx = lambda i, j: j * (nx + 1) + i
lines, polys = [], []
for i in range(nx):
    lines.append([idx(i, 0), idx(i + 1, 0)])
for j in range(ny):
    for i in range(nx):
        if (i + j) % 2:
            polys.append([idx(i, j), idx(i + 1, j), idx(i + 1, j + 1), idx(i, j + 1)])
        else:
            polys += [[idx(i, j), idx(i + 1, j), idx(i + 1, j + 1)], [idx(i, j), idx(i + 1, j + 1), idx(i, j + 1)]]
def arrays(d, n):
    tag = vtk.vtkStringArray(); tag.SetName('boundary_tag')
    extra = vtk.vtkDoubleArray(); extra.SetName('growth')
    for c in range(n):
        tag.InsertNextValue('floor' if c < len(lines) else ''); extra.InsertNextValue(0.5 * c)
    d.GetCellData().AddArray(tag); d.GetCellData().AddArray(extra)
    p = vtk.vtkDoubleArray(); p.SetName('pressure')
    for k in range(d.GetNumberOfPoints()): p.InsertNextValue(101325.0 + k)
    d.GetPointData().AddArray(p)
    note = vtk.vtkStringArray(); note.SetName('note'); note.InsertNextValue('written by the VTK library')
    d.GetFieldData().AddArray(note)
ug = vtk.vtkUnstructuredGrid(); ug.SetPoints(pts)
for l in lines: ug.InsertNextCell(vtk.VTK_LINE, 2, l)
for p in polys: ug.InsertNextCell(vtk.VTK_TRIANGLE if len(p) == 3 else vtk.VTK_QUAD, len(p), p)
arrays(ug, ug.GetNumberOfCells())
pd = vtk.vtkPolyData(); pd.SetPoints(pts)
la, pa = vtk.vtkCellArray(), vtk.vtkCellArray()
for l in lines: la.InsertNextCell(len(l), l)
for p in polys: pa.InsertNextCell(len(p), p)
pd.SetLines(la); pd.SetPolys(pa)
arrays(pd, pd.GetNumberOfCells())
files = []
for ext, data, make in [('vtu', ug, vtk.vtkXMLUnstructuredGridWriter), ('vtp', pd, vtk.vtkXMLPolyDataWriter)]:
    for mode in ['ascii', 'binary', 'appended', 'appended-base64']:
        for zlib in ([0] if mode == 'ascii' else [0, 1]):
            for h64 in [0, 1]:
                name = '%s%s%s.%s' % (mode, '-zlib' if zlib else '', '-h64' if h64 else '', ext)
                w = make(); w.SetInputData(data); w.SetFileName(out + '/' + name)
                {'ascii': w.SetDataModeToAscii, 'binary': w.SetDataModeToBinary}.get(mode, w.SetDataModeToAppended)()
                w.SetEncodeAppendedData(mode == 'appended-base64')
                w.SetCompressorTypeToZLib() if zlib else w.SetCompressorTypeToNone()
                w.SetHeaderTypeToUInt64() if h64 else w.SetHeaderTypeToUInt32()
                if not w.Write(): raise SystemExit('cannot write ' + name)
                files.append(name)
xyz = [c for k in range(pts.GetNumberOfPoints()) for c in pts.GetPoint(k)]
print(json.dumps({'files': files, 'xyz': xyz, 'lines': len(lines), 'polys': len(polys)}))
`

// vtkCutReadScript reads each file named on its command line with the VTK
// library's XML reader for its extension and prints, for each, whether
// the reader reported an error and the cells it gave.
const vtkCutReadScript = `
import sys, json, vtk
vtk.vtkLogger.SetStderrVerbosity(vtk.vtkLogger.VERBOSITY_OFF)
ow = vtk.vtkStringOutputWindow(); vtk.vtkOutputWindow.SetInstance(ow)
out = {}
for path in sys.argv[1:]:
    before = len(ow.GetOutput())
    r = vtk.vtkXMLUnstructuredGridReader() if path.endswith('.vtu') else vtk.vtkXMLPolyDataReader()
    r.SetFileName(path); r.Update()
    out[path] = {'error': len(ow.GetOutput()) > before, 'cells': r.GetOutput().GetNumberOfCells()}
print(json.dumps(out))
`

// readerFor returns the reader a file's name calls for: ReadVTU for .vtu,
// ReadVTP for .vtp, ReadVTS for .vts, ReadBoundaryVTP for a boundary .vtp of lines only.
func readerFor(name string) func([]byte, string) (any, error) {
	switch {
	case strings.HasPrefix(filepath.Base(name), "boundary"):
		return func(b []byte, n string) (any, error) { return ReadBoundaryVTP(b, n) }
	case strings.HasSuffix(name, ".vtp"):
		return func(b []byte, n string) (any, error) { return ReadVTP(b, n) }
	case strings.HasSuffix(name, ".vts"):
		return func(b []byte, n string) (any, error) { return ReadVTS(b, n) }
	}
	return func(b []byte, n string) (any, error) { return ReadVTU(b, n) }
}

// cutOffsets lists the lengths at which cutTest cuts an n-byte file:
// every length for a file of up to 8 KiB, else every length in its first
// and last 2 KiB and some 3000 spread between, at an odd step so that the
// cuts fall at every alignment. With -short, every seventh length of a
// small file is cut, and every one in its last 256 bytes.
func cutOffsets(n int) []int {
	edge, step := 2<<10, max(1, n/3000)|1
	if n <= 8<<10 {
		edge, step = n, 1
		if testing.Short() {
			edge, step = 256, 7
		}
	}
	var out []int
	for i := 0; i < n; i++ {
		if i < edge || i >= n-edge || i%step == 0 {
			out = append(out, i)
		}
	}
	return out
}

// onlySpaceCut says whether cutting data to n bytes removes nothing but
// trailing whitespace (XML 1.0, production S: space, tab, CR, LF).
func onlySpaceCut(data []byte, n int) bool {
	return len(bytes.TrimRight(data, " \t\r\n")) <= n
}

// cutTest reads the whole file (which must succeed), then every cut of it
// at cutOffsets: a cut that removes only trailing whitespace must read
// the same as the whole file; any other must be an error naming the file
// and saying that it is cut short. It returns the cuts that read.
func cutTest(t *testing.T, name string, data []byte) (spaceCuts []int) {
	t.Helper()
	read := readerFor(name)
	whole, err := read(data, name)
	if err != nil {
		t.Fatalf("%s (whole, %d bytes): %v", name, len(data), err)
	}
	bad := 0
	for _, n := range cutOffsets(len(data)) {
		got, err := read(data[:n:n], name)
		switch {
		case onlySpaceCut(data, n):
			spaceCuts = append(spaceCuts, n)
			if err != nil {
				t.Errorf("%s cut to %d of %d bytes (only trailing whitespace removed): %v", name, n, len(data), err)
			} else if !reflect.DeepEqual(got, whole) {
				t.Errorf("%s cut to %d of %d bytes (only trailing whitespace removed) reads differently from the whole file", name, n, len(data))
			}
		case err == nil:
			t.Errorf("%s cut to %d of %d bytes: read without error", name, n, len(data))
			bad++
		case !strings.Contains(err.Error(), name+":") || !strings.Contains(err.Error(), "cut short"):
			t.Errorf("%s cut to %d of %d bytes: the error does not name the file and say it is cut short: %v", name, n, len(data), err)
			bad++
		}
		if bad > 10 {
			t.Fatalf("%s: too many failures", name)
		}
	}
	return spaceCuts
}

// TestCutOwnFiles cuts files cvdeck writes: a deck's mesh.vtu, with the
// quality fields the readers skip, and boundary.vtp, with its FieldData
// names, small and large (raw appended, as WriteVTU and
// WriteBoundaryVTP write them).
func TestCutOwnFiles(t *testing.T) {
	for _, m := range []struct {
		name   string
		nx, ny int
	}{{"small", 6, 5}, {"large", 60, 40}} {
		mixed := mixedMesh(t, m.nx, m.ny, 0)
		fields := []Field{squareField(mixed.NumCells()), {Name: "growth", Values: mixed.Geo.CellArea}}
		var vtu, vtp bytes.Buffer
		if err := WriteVTU(&vtu, mixed, fields); err != nil {
			t.Fatal(err)
		}
		if err := WriteBoundaryVTP(&vtp, mixed, []string{"wall", "outflow", "wall"}); err != nil {
			t.Fatal(err)
		}
		if cuts := cutTest(t, m.name+"/mesh.vtu", vtu.Bytes()); len(cuts) != 1 {
			// WriteVTU ends the file with one line end.
			t.Errorf("%s/mesh.vtu: %d cuts of only whitespace, want 1", m.name, len(cuts))
		}
		cutTest(t, m.name+"/boundary.vtp", vtp.Bytes())
	}
}

// TestCutFilesWrittenByVTK cuts the VTK library's own files in each of its
// XML writers' data modes. The whole files must all read as the same mesh
// (one for the unstructured grids, one for the PolyData), with exactly the
// points the library wrote. The library's reader is the reference for the
// cuts that remove only whitespace: it reads them, as cvdeck must. Cuts
// it reads although bytes are missing (it does not look for the end tags
// after the appended data) are only counted: cvdeck refuses them, by the
// file-format specification.
func TestCutFilesWrittenByVTK(t *testing.T) {
	dir := t.TempDir()
	var got struct {
		Files []string  `json:"files"`
		XYZ   []float64 `json:"xyz"`
		Lines int       `json:"lines"`
		Polys int       `json:"polys"`
	}
	runPython(t, vtkEncodingsScript, &got, dir)
	if len(got.Files) != 2*14 {
		t.Fatalf("the script wrote %d files, want 28", len(got.Files))
	}
	first, firstName := map[string]any{}, map[string]string{}
	files := map[string][]byte{}
	cutDir := t.TempDir()
	var cutFiles []string
	spaceOnly := map[string]bool{} // cut file → only whitespace cut off
	for _, name := range got.Files {
		data, err := os.ReadFile(filepath.Join(dir, name))
		if err != nil {
			t.Fatal(err)
		}
		files[name] = data
		m, err := readerFor(name)(data, name)
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		ext := filepath.Ext(name)
		if f, ok := first[ext]; !ok {
			first[ext], firstName[ext] = m, name
			checkVTKPoints(t, name, data, got.XYZ, got.Polys)
		} else if !reflect.DeepEqual(m, f) {
			t.Errorf("%s reads differently from %s", name, firstName[ext])
		}
		// The VTK library reads the cuts in the last 40 bytes of each
		// file, its end tags. (Cut deeper, its reader can abort the
		// process: std::bad_alloc, seen with VTK 9.1.)
		for k := 1; k <= 40; k++ {
			n := len(data) - k
			p := filepath.Join(cutDir, fmt.Sprintf("%d-%s", n, name))
			if err := os.WriteFile(p, data[:n], 0o644); err != nil {
				t.Fatal(err)
			}
			cutFiles = append(cutFiles, p)
			spaceOnly[p] = onlySpaceCut(data, n)
		}
	}
	t.Run("cuts", func(t *testing.T) {
		for _, name := range got.Files {
			t.Run(name, func(t *testing.T) {
				t.Parallel()
				cutTest(t, name, files[name])
			})
		}
	})
	var lib map[string]struct {
		Error bool `json:"error"`
		Cells int  `json:"cells"`
	}
	runPython(t, vtkCutReadScript, &lib, cutFiles...)
	lenient := 0
	for _, p := range cutFiles {
		r := lib[p]
		switch {
		case spaceOnly[p] && (r.Error || r.Cells != got.Lines+got.Polys):
			t.Errorf("%s: the VTK library refuses a cut of only whitespace (error %v, %d cells)", p, r.Error, r.Cells)
		case !spaceOnly[p] && !r.Error:
			lenient++
		}
	}
	t.Logf("the VTK library read %d of %d cut files that cvdeck refuses", lenient, len(cutFiles))
}

// checkVTKPoints checks that a file the VTK library wrote reads with the
// points it wrote, exactly, and its polys as cells.
func checkVTKPoints(t *testing.T, name string, data []byte, xyz []float64, polys int) {
	t.Helper()
	var g *grid
	var err error
	if strings.HasSuffix(name, ".vtp") {
		g, err = parseVTP(data, name)
	} else {
		g, err = parseVTU(data, name)
	}
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(g.points, xyz) {
		t.Errorf("%s: points %v, the VTK library wrote %v", name, g.points, xyz)
	}
	m, err := g.toMesh()
	if err != nil || m.NumCells() != polys {
		t.Errorf("%s: %v cells, want %d (%v)", name, m, polys, err)
	}
}

// TestCutErrorsSayWhere: the errors for cut files name what is missing and
// where, for the cuts the brief of this check was written against: inside
// a cell-data array the reader skips, and in the end tags.
func TestCutErrorsSayWhere(t *testing.T) {
	mixed := mixedMesh(t, 6, 5, 0)
	var b bytes.Buffer
	if err := WriteVTU(&b, mixed, []Field{{Name: "growth", Values: mixed.Geo.CellArea}}); err != nil {
		t.Fatal(err)
	}
	data := b.Bytes()
	_, after, _ := bytes.Cut(data, []byte(`Name="growth" format="appended" offset="`))
	var off int
	fmt.Sscan(string(after[:bytes.IndexByte(after, '"')]), &off)
	start := bytes.IndexByte(data[bytes.Index(data, []byte("<AppendedData")):], '_') + bytes.Index(data, []byte("<AppendedData")) + 1
	for _, c := range []struct {
		n    int
		want string
	}{
		{start + off + 20, fmt.Sprintf(`t.vtu: the file ends at byte %d inside the appended data of array "CellData/growth" (needs %d bytes, %d are there)`, start+off+20, 8*mixed.NumCells(), 12)},
		{start + off + 3, fmt.Sprintf(`t.vtu: the file ends at byte %d inside the appended data of array "CellData/growth" (header: needs 8 bytes, 3 are there)`, start+off+3)},
		{len(data) - 3, "t.vtu: no closing </VTKFile> tag after </AppendedData>: the file is cut short"},
		{len(data) - 13, "t.vtu: the </AppendedData> end tag at byte"},
		{len(data) - 30, "t.vtu: no closing </AppendedData> tag after the appended data, which ends at byte"},
		{200, "t.vtu: the file ends at byte 200 inside <Piece> (line 4): no closing </VTKFile> tag: the file is cut short"},
		{10, "t.vtu: the file ends at byte 10 before its first element: no closing </VTKFile> tag: the file is cut short"},
		{22, "t.vtu: no XML elements in its 22 bytes: the file is empty or cut short"},
	} {
		_, err := ReadVTU(data[:c.n], "t.vtu")
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("cut to %d bytes: got %v, want %q", c.n, err, c.want)
		}
	}
}

// TestBase64Skip: stepping over base64 data ends where decoding it does,
// for every split of streams the VTK library writes (a header and data in
// one stream, or each padded on its own) and every length.
func TestBase64Skip(t *testing.T) {
	for n := range 40 {
		for split := range n + 1 {
			var text []byte
			src := make([]byte, n)
			for i := range src {
				src[i] = byte(7*i + 1)
			}
			for _, part := range [][]byte{src[:split], src[split:]} {
				text = append(text, base64.StdEncoding.EncodeToString(part)...)
			}
			text = append(text, "AAAA"...) // what follows
			for take := 0; take <= n; take++ {
				a, b := &base64Source{text: text}, &base64Source{text: text}
				if _, err := a.next(uint64(take)); err != nil {
					t.Fatalf("n %d split %d take %d: next: %v", n, split, take, err)
				}
				if err := b.skip(uint64(take)); err != nil {
					t.Fatalf("n %d split %d take %d: skip: %v", n, split, take, err)
				}
				if a.rest() != b.rest() || !bytes.Equal(a.pending, b.pending) {
					t.Fatalf("n %d split %d take %d: next leaves %d characters and %v, skip %d and %v", n, split, take, a.rest(), a.pending, b.rest(), b.pending)
				}
			}
			if err := (&base64Source{text: text[:len(text)-4]}).skip(uint64(n + 1)); err == nil {
				t.Fatalf("n %d split %d: skipping past the end is no error", n, split)
			}
		}
	}
}
