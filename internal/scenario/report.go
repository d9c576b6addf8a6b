package scenario

import (
	"encoding/csv"
	"fmt"
	"io"
	"strconv"
	"strings"
	"text/tabwriter"

	"ringbox/internal/phys"
)

// WriteCSV writes the curves as tidy columns with units in the header.
func (r *Result) WriteCSV(w io.Writer) error {
	cw := csv.NewWriter(w)
	header := []string{"energy_eV"}
	type col struct{ data []float64 }
	var cols []col
	for _, name := range []string{"scenario", "box", "ring", "continuum", "smooth"} {
		header = append(header, "states_"+name)
		cols = append(cols, col{r.Curves.States[name]})
	}
	for _, name := range []string{"scenario", "box", "ring", "continuum", "smooth"} {
		header = append(header, "dos_"+name+"_per_eV")
		cols = append(cols, col{r.Curves.DOS[name]})
	}
	for _, name := range Variants {
		header = append(header, "modes_"+name)
		cols = append(cols, col{r.Curves.Modes[name]})
	}
	if err := cw.Write(header); err != nil {
		return err
	}
	row := make([]string, len(header))
	for i, e := range r.Curves.EnergyEV {
		row[0] = strconv.FormatFloat(e, 'g', 10, 64)
		for j, c := range cols {
			row[j+1] = strconv.FormatFloat(c.data[i], 'g', 10, 64)
		}
		if err := cw.Write(row); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// WriteTable writes a readable summary with units.
func (r *Result) WriteTable(w io.Writer) error {
	s := r.s
	fmt.Fprintf(w, "ringbox count — %s\n", s.Material.Name)
	var axes []string
	for i := 0; i < s.Dims; i++ {
		axes = append(axes, fmt.Sprintf("%s: %s %s", axisNames[i], phys.FormatLength(s.LengthM[i]), s.BC[i]))
	}
	fmt.Fprintf(w, "axes     %s; transport along %s\n", strings.Join(axes, ", "), axisNames[s.Along])
	fmt.Fprintf(w, "method   %s (modes %s)", r.Method, r.ModesMethod)
	if r.ErrorEstimate != nil {
		fmt.Fprintf(w, ", states ± %.3g", *r.ErrorEstimate)
	}
	fmt.Fprintf(w, "\nE_F      %.6g eV at %g K; states below emax = %g eV: %.10g\n\n", r.EFEV, s.TempK, s.EmaxEV, r.StatesBelow)

	tw := tabwriter.NewWriter(w, 2, 4, 2, ' ', tabwriter.AlignRight)
	if len(r.Levels) > 0 {
		fmt.Fprintln(w, "lowest levels")
		fmt.Fprintln(tw, "#\tenergy (eV)\tdegeneracy\tvalleys\tn\t")
		for i, l := range r.Levels {
			if i == 10 {
				break
			}
			fmt.Fprintf(tw, "%d\t%.6g\t%d\t%s\t%v\t\n", i+1, l.EnergyEV, l.Degeneracy, strings.Join(l.Valleys, " "), l.N)
		}
		tw.Flush()
		fmt.Fprintln(w)
	}
	fmt.Fprintln(w, "point values (states N ≤ E; modes M)")
	fmt.Fprintln(tw, "E (eV)\tN scenario\tN box\tN ring\tN continuum\tN smooth\tM scenario\tM box\tM ring\tM continuum\t")
	for _, p := range r.At {
		fmt.Fprintf(tw, "%.6g\t%.10g\t%.10g\t%.10g\t%.6g\t%.6g\t%.6g\t%.6g\t%.6g\t%.6g\t\n", p.EnergyEV,
			p.States["scenario"], p.States["box"], p.States["ring"], p.States["continuum"], p.States["smooth"],
			p.Modes["scenario"], p.Modes["box"], p.Modes["ring"], p.Modes["continuum"])
	}
	tw.Flush()
	fmt.Fprintln(w)
	fmt.Fprintf(w, "observables at E_F = %.6g eV, T = %g K\n", r.EFEV, s.TempK)
	fmt.Fprintf(tw, "variant\telectrons\tdensity (%s)\tG (S)\tG (2e²/h)\tC_Q (F)\t\n", s.DensityUnit())
	for _, name := range Variants {
		o := r.Observables[name]
		fmt.Fprintf(tw, "%s\t%.6g\t%.4g\t%.4g\t%.4g\t%.4g\t\n", name, o.Electrons, o.Density, o.ConductanceS, o.ConductanceG0, o.QuantumCapacitance)
	}
	tw.Flush()
	for _, n := range r.Notes {
		fmt.Fprintf(w, "\nnote: %s", n)
	}
	fmt.Fprintln(w)
	return nil
}
