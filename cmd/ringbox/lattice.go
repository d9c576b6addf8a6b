package main

import (
	"context"
	"encoding/csv"
	"fmt"
	"io"
	"strconv"
	"text/tabwriter"

	"ringbox/internal/lattice"
	"ringbox/internal/phys"
	"ringbox/internal/scenario"
)

// ringbox lattice: graphene ribbons and nanotubes in nearest-neighbour
// tight binding, the same request and JSON as GET /api/v1/lattice.

func init() { commands["lattice"] = latticeCmd }

// latticeFlagHelp is the usage text of each lattice key.
var latticeFlagHelp = map[string]string{
	"structure": "armchair or zigzag ribbon, or tube",
	"lines":     "ribbon width: dimer lines (armchair) or zigzag chains (zigzag)",
	"n":         "tube chiral index n",
	"m":         "tube chiral index m, 0 ≤ m ≤ n",
	"gamma0":    "nearest-neighbour hopping γ0 (eV or meV; bare numbers are eV)",
	"acc":       "carbon–carbon distance a_cc (0.142nm, 1.42A; bare numbers are nm)",
	"gs":        "spin degeneracy, 1 or 2",
	"ef":        "Fermi level from charge neutrality (eV)",
	"temp":      "temperature (K)",
	"at":        "comma list of energies for point values (eV)",
	"emin":      "lowest energy of the D(E), M(E) curves (eV)",
	"emax":      "highest energy of the curves (eV)",
	"points":    "energy bins of the curves",
	"kpoints":   "k points across the Brillouin zone (odd; even is raised by one)",
}

func latticeCmd(ctx context.Context, args []string, stdout, stderr io.Writer) int {
	fs := newFlagSet("lattice", stderr)
	given := keyFlags(fs, scenario.LatticeKeys, func(k string) string { return latticeFlagHelp[k] })
	formatOpt := newFormatFlag(fs, "table", "json", "csv")
	if code, ok := parseFlags(fs, args, stderr); !ok {
		return code
	}
	format, ok := formatOpt.get(stderr)
	if !ok {
		return 2
	}
	req, err := scenario.ParseLattice(given())
	if err != nil {
		return fail(stderr, "lattice", err)
	}
	res, err := scenario.RunLattice(ctx, req)
	if err != nil {
		return fail(stderr, "lattice", err)
	}
	// JSON byte for byte the API's answer: compact, one line.
	err = writeResult(stdout, format, res, "",
		func(w io.Writer) error { return writeLatticeCSV(w, res) },
		func(w io.Writer) error { return writeLatticeTable(w, res) })
	if err != nil {
		fmt.Fprintf(stderr, "ringbox lattice: %v\n", err)
		return 1
	}
	return 0
}

// writeLatticeCSV writes the curves: one row per energy bin centre, with
// D(E) per eV per nm of length and M(E) in channels, spin included.
func writeLatticeCSV(w io.Writer, r lattice.Result) error {
	cw := csv.NewWriter(w)
	if err := cw.Write([]string{"energy_eV", "dos_per_eV_per_nm", "modes"}); err != nil {
		return err
	}
	c := r.Curves
	for i, e := range c.EnergyEV {
		row := []string{
			strconv.FormatFloat(e, 'g', 10, 64),
			strconv.FormatFloat(c.DOS[i], 'g', 10, 64),
			strconv.Itoa(c.Modes[i]),
		}
		if err := cw.Write(row); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// writeLatticeTable writes a readable summary: the structure beside its
// partner, the point values, and the notes.
func writeLatticeTable(w io.Writer, r lattice.Result) error {
	p := r.Partner
	fmt.Fprintf(w, "ringbox lattice — %s, nearest-neighbour tight binding\n", r.Name())
	fmt.Fprintf(w, "model    γ0 = %g eV, a_cc = %g nm, g_s = %d; E_F = %g eV at %g K\n\n", r.Gamma0EV, r.AccNM, r.Gs, r.EFEV, r.TempK)

	tw := tabwriter.NewWriter(w, 2, 4, 2, ' ', 0)
	head := "partner (rolled into a tube)"
	if r.Structure == lattice.Tube {
		head = "partner (unrolled)"
	}
	fmt.Fprintln(tw, "\tthis structure\t"+head)
	computed := p.Structure != "none"
	other := func(s string) string {
		if !computed {
			return "—"
		}
		return s
	}
	fmt.Fprintf(tw, "structure\t%s\t%s\n", r.Name(), partnerName(p))
	fmt.Fprintf(tw, "width or diameter\t%s\t%s\n", sizeValue(r.WidthNM, r.DiameterNM), other(sizeValue(p.WidthNM, p.DiameterNM)))
	fmt.Fprintf(tw, "gap\t%.4g eV\t%s\n", r.GapEV, other(fmt.Sprintf("%.4g eV", p.GapEV)))
	fmt.Fprintf(tw, "metallic\t%s\t%s\n", yesNo(r.Metallic), other(yesNo(p.Metallic)))
	fmt.Fprintf(tw, "family\t%s\t%s\n", r.Structure.FamilyLabel(r.Family), other(p.Structure.FamilyLabel(p.Family)))
	fmt.Fprintf(tw, "modes at E_F\t%d\t%s\n", r.Observables.ModesAtEF, other(strconv.Itoa(p.ModesAtEF)))
	fmt.Fprintf(tw, "G at E_F\t%s\t%s\n", phys.FormatSI(r.Observables.ConductanceS, "S", 4), other(phys.FormatSI(p.ConductanceS, "S", 4)))
	fmt.Fprintf(tw, "G at E_F (2e²/h)\t%.4g\t%s\n", r.Observables.ConductanceS/phys.ConductanceQuantum,
		other(fmt.Sprintf("%.4g", p.ConductanceS/phys.ConductanceQuantum)))
	fmt.Fprintf(tw, "D at E_F (states/(eV·nm))\t%.4g\t\n", r.Observables.DOSAtEF)
	fmt.Fprintf(tw, "period (nm)\t%.4g\t\n", r.PeriodNM)
	fmt.Fprintf(tw, "atoms per cell\t%d\t\n", r.AtomsPerCell)
	if err := tw.Flush(); err != nil {
		return err
	}
	fmt.Fprintf(w, "partner: %s\n", p.Note)

	if len(r.At) > 0 {
		fmt.Fprintln(w, "\npoint values (spin included; D averaged over one bin)")
		fmt.Fprintln(tw, "E (eV)\tmodes M\tD (states/(eV·nm))")
		for _, pt := range r.At {
			fmt.Fprintf(tw, "%.6g\t%d\t%.6g\n", pt.EnergyEV, pt.Modes, pt.DOS)
		}
		if err := tw.Flush(); err != nil {
			return err
		}
	}
	fmt.Fprintf(w, "\nD(E): %s\n", r.DOSMethod)
	for _, n := range r.Notes {
		fmt.Fprintf(w, "note: %s\n", n)
	}
	_, err := fmt.Fprintln(w, "model: nearest-neighbour π-band tight binding; no edge relaxation, curvature or spin–orbit coupling.\n"+
		"Size and compare options with it; base design decisions on full simulation, measurement and your own design rules.")
	return err
}

func partnerName(p lattice.Partner) string {
	if p.Structure == "none" {
		return "none"
	}
	name := p.Name()
	if !p.Exact {
		name += " (nearest)"
	}
	return name
}

func sizeValue(widthNM, diameterNM *float64) string {
	switch {
	case widthNM != nil:
		return fmt.Sprintf("%.4g nm wide", *widthNM)
	case diameterNM != nil:
		return fmt.Sprintf("%.4g nm diameter", *diameterNM)
	}
	return "—"
}

func yesNo(b bool) string {
	if b {
		return "yes"
	}
	return "no"
}
