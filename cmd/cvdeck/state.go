package main

import (
	"encoding/json"
	"fmt"
	"io"

	"cvdeck/bc"

	"github.com/spf13/cobra"
)

// stateFlags are the flags of `cvdeck state`.
type stateFlags struct {
	mach, altitude, pressure, temperature, velocity, density float64
	altitudeKind, gas                                        string
	gamma, gasConstant, length, yplus                        float64
	sutherland                                               []float64
	normalShock, json                                        bool
}

// newStateCommand returns `cvdeck state`: the reference flow state and the
// derived figures from flags, without a mesh. Every error it returns for bad
// flags wraps bc.ErrInput (exit code 2).
func newStateCommand() *cobra.Command {
	var f stateFlags
	cmd := &cobra.Command{
		Use:   "state",
		Short: "Compute a reference flow state and its derived figures",
		Long: `state computes an ideal-gas flow state and prints it: static and total
pressure and temperature, density, speed of sound, velocity, dynamic pressure,
viscosity (Sutherland's law: air's constants unless --sutherland gives the
gas's) and Reynolds number per metre; with --length the
Reynolds number over that length, with --yplus the first-cell height for that
y+ at a distance --length from the leading edge of an adiabatic flat plate
(a first guess: turbulent skin friction at Eckert's reference temperature,
y+ in wall units). Notes follow where a model is stretched: temperatures
outside the range of air's Sutherland constants or of its constant gamma, a
gamma above 5/3, a laminar or very long plate for the first-cell height.

Give the state by one of:
  --mach M --altitude H [--altitude-kind geometric|geopotential]
      (U.S. Standard Atmosphere 1976, -5 km to 86 km)
  --mach M --pressure P --temperature T
  --velocity V --density RHO --temperature T

All values are SI: m, Pa, K, kg/m^3, m/s.`,
		Example: `  cvdeck state --mach 0.78 --altitude 11000 --length 4.2 --yplus 1
  cvdeck state --mach 2 --pressure 5000 --temperature 220 --normal-shock --json`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			return runState(cmd, f, cmd.OutOrStdout())
		},
	}
	fl := cmd.Flags()
	fl.Float64Var(&f.mach, "mach", 0, "free-stream Mach number")
	fl.Float64Var(&f.altitude, "altitude", 0, "altitude in metres in the U.S. Standard Atmosphere 1976")
	fl.StringVar(&f.altitudeKind, "altitude-kind", "geometric", "how --altitude is measured: geometric or geopotential")
	fl.Float64Var(&f.pressure, "pressure", 0, "static pressure, Pa")
	fl.Float64Var(&f.temperature, "temperature", 0, "static temperature, K")
	fl.Float64Var(&f.velocity, "velocity", 0, "flow speed, m/s (with --density and --temperature)")
	fl.Float64Var(&f.density, "density", 0, "density, kg/m^3 (with --velocity and --temperature)")
	fl.StringVar(&f.gas, "gas", "air", "working gas: air (gamma 1.4, R 287.05287 J/(kg K))")
	fl.Float64Var(&f.gamma, "gamma", 0, "ratio of specific heats, instead of --gas (with --gas-constant)")
	fl.Float64Var(&f.gasConstant, "gas-constant", 0, "specific gas constant R in J/(kg K), instead of --gas (with --gamma)")
	fl.Float64SliceVar(&f.sutherland, "sutherland", nil, "the gas's Sutherland constants MU_REF,T_REF,S (Pa s, K, K); air's by default")
	fl.Float64Var(&f.length, "length", 0, "reference length in metres, for the Reynolds number and the first-cell height")
	fl.Float64Var(&f.yplus, "yplus", 0, "target y+ for the first-cell height (needs --length)")
	fl.BoolVar(&f.normalShock, "normal-shock", false, "also give the state behind a normal shock (needs M > 1)")
	fl.BoolVar(&f.json, "json", false, "print one JSON object of SI values instead of a table")
	cmd.SetFlagErrorFunc(func(_ *cobra.Command, err error) error {
		return fmt.Errorf("state: %w: %w", err, bc.ErrInput)
	})
	return cmd
}

// usage wraps a flag problem as a bad-input error.
func usage(format string, args ...any) error {
	return fmt.Errorf("state: "+format+": %w", append(args, bc.ErrInput)...)
}

func runState(cmd *cobra.Command, f stateFlags, out io.Writer) error {
	set := func(name string) bool { return cmd.Flags().Changed(name) }
	gas := bc.Air
	switch {
	case set("gamma") || set("gas-constant"):
		if set("gas") {
			return usage("give either --gas or --gamma with --gas-constant, not both")
		}
		if !set("gamma") || !set("gas-constant") {
			return usage("--gamma and --gas-constant go together; give both")
		}
		gas = bc.Gas{Gamma: f.gamma, R: f.gasConstant}
	case f.gas != "air":
		return usage("unknown gas %q; use --gas air, or --gamma and --gas-constant", f.gas)
	}
	if set("sutherland") {
		if len(f.sutherland) != 3 {
			return usage("--sutherland takes three numbers, MU_REF,T_REF,S (Pa s, K, K), e.g. 1.716e-5,273.15,110.4 for air; got %d", len(f.sutherland))
		}
		gas.Sutherland = bc.Sutherland{MuRef: f.sutherland[0], TRef: f.sutherland[1], S: f.sutherland[2]}
	}

	byAltitude := set("altitude")
	byPT := set("pressure")
	byVelocity := set("velocity") || set("density")
	var st bc.State
	var err error
	source := ""
	switch {
	case countTrue(byAltitude, byPT, byVelocity) != 1:
		return usage("give the state by exactly one of: --mach with --altitude; --mach with --pressure and --temperature; --velocity with --density and --temperature")
	case byAltitude:
		if !set("mach") || set("temperature") {
			return usage("--altitude needs --mach and takes no --temperature (the standard atmosphere gives it)")
		}
		kind, kerr := bc.ParseAltitudeKind(f.altitudeKind)
		if kerr != nil {
			return fmt.Errorf("state: --altitude-kind: %w", kerr)
		}
		alt := bc.Altitude{Metres: f.altitude, Kind: kind}
		st, err = bc.StateFromAltitude(gas, alt, f.mach)
		other := fmt.Sprintf("%.1f m geopotential", alt.Geopotential())
		if kind == bc.Geopotential {
			other = fmt.Sprintf("%.1f m geometric", alt.Geometric())
		}
		source = fmt.Sprintf("U.S. Standard Atmosphere 1976 at %g m %s (%s)", f.altitude, kind, other)
	case byPT:
		if !set("mach") || !set("temperature") {
			return usage("--pressure needs --mach and --temperature")
		}
		st, err = bc.StateFromMach(gas, f.mach, f.pressure, f.temperature)
		source = "given Mach number, pressure and temperature"
	default:
		if !set("velocity") || !set("density") || !set("temperature") || set("mach") {
			return usage("--velocity and --density need --temperature and take no --mach (it follows from them)")
		}
		st, err = bc.StateFromVelocity(gas, f.velocity, f.density, f.temperature)
		source = "given velocity, density and temperature"
	}
	if err == nil && set("altitude-kind") && !byAltitude {
		err = usage("--altitude-kind goes with --altitude")
	}
	if err != nil {
		return fmt.Errorf("state: %w", err)
	}

	entries := append(gas.Entries(), st.Entries()...)
	if set("length") {
		if !(f.length > 0) {
			return usage("--length %g m must be positive", f.length)
		}
		entries = append(entries, bc.Entry{Key: "reynolds", Value: st.Reynolds(f.length), Unit: "1"})
	}
	var wall bc.WallSpacing
	if set("yplus") {
		if !set("length") {
			return usage("--yplus needs --length, the distance from the leading edge at which y+ is wanted")
		}
		w, err := bc.FirstCellHeight(st, f.length, f.yplus)
		if err != nil {
			return fmt.Errorf("state: --yplus: %w", err)
		}
		entries = append(entries, bc.Entry{Key: "first_cell_height", Value: w.Height, Unit: "m"},
			bc.Entry{Key: "skin_friction", Value: w.SkinFriction, Unit: "1"},
			bc.Entry{Key: "adiabatic_wall_temperature", Value: w.WallTemperature, Unit: "K"},
			bc.Entry{Key: "eckert_reference_temperature", Value: w.ReferenceTemperature, Unit: "K"})
		wall = w
	}
	var notes []string
	if gas.BorrowsAirViscosity() {
		notes = append(notes, "dynamic_viscosity: this gas has no Sutherland constants of its own (--sutherland MU_REF,T_REF,S), so air's are used, and the Reynolds number and first-cell height follow from them")
	}
	notes = append(append(notes, st.Notes()...), wall.Notes...)
	var shock bc.Entries
	if f.normalShock {
		post, err := st.PostNormalShock()
		if err != nil {
			return fmt.Errorf("state: --normal-shock: %w", err)
		}
		shock = post.Entries()
		for _, n := range post.Notes() {
			notes = append(notes, "behind the normal shock: "+n)
		}
	}

	if f.json {
		return writeStateJSON(out, entries, shock, notes)
	}
	if globalFlag(cmd, "quiet") {
		return nil
	}
	fmt.Fprintf(out, "Reference state (%s)\n\n%s", source, entries.Table())
	if set("yplus") {
		fmt.Fprintf(out, "\nfirst_cell_height: a first guess for y+ = %g at x = %g m on an adiabatic flat plate (wall at %.4g K): turbulent, Schlichting's C_f = [2 log10(Re_x) - 0.65]^-2.3 at Eckert's reference temperature %.4g K, y+ in wall units; the solution's own wall shear decides\n",
			f.yplus, f.length, wall.WallTemperature, wall.ReferenceTemperature)
	}
	if shock != nil {
		fmt.Fprintf(out, "\nBehind a normal shock\n\n%s", shock.Table())
	}
	if len(notes) > 0 {
		fmt.Fprintf(out, "\nNotes\n\n")
		for _, n := range notes {
			fmt.Fprintf(out, "  %s\n", n)
		}
	}
	return nil
}

// writeStateJSON prints one object: the entries, the post-shock state
// under "post_shock" when asked, and the notes as a list of strings under
// "notes" when there are any.
func writeStateJSON(out io.Writer, entries, shock bc.Entries, notes []string) error {
	b, err := json.Marshal(entries)
	if err != nil {
		return fmt.Errorf("state: %w", err)
	}
	if shock != nil {
		s, err := json.Marshal(shock)
		if err != nil {
			return fmt.Errorf("state: %w", err)
		}
		b = append(append(append(b[:len(b)-1], `,"post_shock":`...), s...), '}')
	}
	if len(notes) > 0 {
		n, err := json.Marshal(notes)
		if err != nil {
			return fmt.Errorf("state: %w", err)
		}
		b = append(append(append(b[:len(b)-1], `,"notes":`...), n...), '}')
	}
	_, err = fmt.Fprintf(out, "%s\n", b)
	return err
}

func countTrue(bs ...bool) int {
	n := 0
	for _, b := range bs {
		if b {
			n++
		}
	}
	return n
}
