package scenario

import (
	"fmt"
	"math"
	"net/url"
	"slices"
	"strconv"
	"strings"

	"ringbox/internal/material"
	"ringbox/internal/phys"
	"ringbox/internal/spectrum"
)

// Limits on what one request may ask for. They keep every request bounded in
// work; the exact-count budget (Budget) bounds the rest.
const (
	MinLengthM    = 0.1e-9
	MaxLengthM    = 1.0
	MaxPoints     = 4000
	MaxAt         = 64
	MaxEnergyEV   = 1000
	MinEnergyEV   = -10
	MaxTempK      = 5000
	DefaultBudget = 2e10 // operations of the cheapest exact plan; above it the count is asymptotic
	MaxBudget     = 1e12
)

// Keys lists every scenario key in the order forms and tables show them.
var Keys = []string{"material", "m", "mx", "my", "mz", "gv", "gs", "alpha", "dims",
	"lx", "ly", "lz", "bx", "by", "bz", "along", "emin", "emax", "points", "temp", "ef", "density",
	"eta", "shape", "mfp", "at", "budget"}

var axisNames = [3]string{"x", "y", "z"}

// Scenario is one validated conductor and what to compute for it.
type Scenario struct {
	Material   material.Material
	MassM0     [3]float64 // custom only: per-axis masses
	GV, GS     int
	AlphaPerEV float64
	alphaSet   bool
	Dims       int
	LengthM    [3]float64
	BC         [3]spectrum.BC
	Along      int
	EminEV     float64
	EmaxEV     float64
	Points     int
	TempK      float64
	EFEV       float64 // the given or default Fermi level (ignored when HasDensity)
	efSet      bool
	HasDensity bool
	Density    float64 // in the unit DensityUnit names
	EtaEV      float64 // 0: default from temperature
	Shape      spectrum.Shape
	MFPM       float64 // 0: ballistic
	AtEV       []float64
	atSet      bool
	Budget     float64
}

// Parse reads a scenario from URL query values (or form values, or CLI flags
// collected into url.Values). Empty values count as absent. Keys that belong
// to a custom material are ignored for catalogue materials. Every error
// names its key.
func Parse(q url.Values) (Scenario, error) {
	for k := range q {
		if !slices.Contains(Keys, k) {
			return Scenario{}, Errorf(k, "unknown key")
		}
		if len(q[k]) > 1 && nonEmpty(q[k]) > 1 {
			return Scenario{}, Errorf(k, "given more than once")
		}
	}
	get := func(k string) string {
		for _, v := range q[k] {
			if s := strings.TrimSpace(v); s != "" {
				return s
			}
		}
		return ""
	}
	var s Scenario
	var err error

	id := strings.ToLower(get("material"))
	if id == "" {
		id = "gaas"
	}
	if id == material.CustomID {
		m, err := number(get("m"), "m", 1, 1e-3, 100)
		if err != nil {
			return s, err
		}
		for i, k := range []string{"mx", "my", "mz"} {
			if s.MassM0[i], err = number(get(k), k, m, 1e-3, 100); err != nil {
				return s, err
			}
		}
		if s.GV, err = integer(get("gv"), "gv", 1, 1, 64); err != nil {
			return s, err
		}
		s.Material = material.Custom(s.MassM0, s.GV, 0)
	} else {
		m, ok := material.Lookup(id)
		if !ok {
			return s, Errorf("material", "unknown material %q (one of %s)", id, strings.Join(material.IDs(), ", "))
		}
		s.Material = m
	}
	if s.GS, err = integer(get("gs"), "gs", 2, 1, 2); err != nil {
		return s, err
	}
	s.AlphaPerEV = s.Material.AlphaPerEV
	if v := get("alpha"); v != "" {
		if s.AlphaPerEV, err = number(v, "alpha", 0, 0, 100); err != nil {
			return s, err
		}
		s.alphaSet = true
	}
	if s.Dims, err = integer(get("dims"), "dims", 3, 1, 3); err != nil {
		return s, err
	}
	defaultL := [3]float64{10e-9, 10e-9, 100e-9}
	defaultBC := [3]spectrum.BC{spectrum.Box, spectrum.Box, spectrum.Open}
	if s.Dims < 3 {
		defaultBC[s.Dims-1] = spectrum.Open
		defaultL[s.Dims-1] = 100e-9
	}
	if s.Dims == 1 {
		defaultBC[0] = spectrum.Box
		defaultL[0] = 100e-9
	}
	for i := 0; i < 3; i++ {
		lk, bk := "l"+axisNames[i], "b"+axisNames[i]
		if i >= s.Dims {
			continue
		}
		s.LengthM[i] = defaultL[i]
		if v := get(lk); v != "" {
			l, err := phys.ParseLength(v)
			if err != nil {
				return s, Errorf(lk, "%v", err)
			}
			if !(l >= MinLengthM && l <= MaxLengthM) {
				return s, Errorf(lk, "length %s out of range (0.1 nm to 1 m)", v)
			}
			s.LengthM[i] = l
		}
		s.BC[i] = defaultBC[i]
		if v := get(bk); v != "" {
			if s.BC[i], err = spectrum.ParseBC(v); err != nil {
				return s, Errorf(bk, "%v", err)
			}
		}
	}
	s.Along = s.Dims - 1
	if v := strings.ToLower(get("along")); v != "" {
		i := slices.Index(axisNames[:], v)
		if i < 0 || i >= s.Dims {
			return s, Errorf("along", "transport axis %q is not one of the conductor's axes (%s)", v, strings.Join(axisNames[:s.Dims], ", "))
		}
		s.Along = i
	}

	emaxDefault := 0.3
	switch s.Material.Kind {
	case material.Metal:
		emaxDefault = math.Round(1.25*s.Material.FermiEV*10) / 10
	case material.Model:
		if id == "free" {
			emaxDefault = 2
		}
	}
	if s.EminEV, err = energy(get("emin"), "emin", 0); err != nil {
		return s, err
	}
	if s.EmaxEV, err = energy(get("emax"), "emax", emaxDefault); err != nil {
		return s, err
	}
	if s.EmaxEV <= s.EminEV {
		return s, Errorf("emax", "emax (%g eV) must be above emin (%g eV)", s.EmaxEV, s.EminEV)
	}
	if s.EmaxEV <= 0 {
		return s, Errorf("emax", "emax must be above the band edge (0 eV)")
	}
	if s.Points, err = integer(get("points"), "points", 400, 2, MaxPoints); err != nil {
		return s, err
	}
	if s.TempK, err = number(get("temp"), "temp", 300, 0, MaxTempK); err != nil {
		return s, err
	}
	ef, dens := get("ef"), get("density")
	if ef != "" && dens != "" {
		return s, Errorf("density", "give either ef or density, not both")
	}
	s.EFEV = s.Material.FermiEV
	if ef != "" {
		if s.EFEV, err = energy(ef, "ef", 0); err != nil {
			return s, err
		}
		s.efSet = true
	}
	if dens != "" {
		if s.Density, err = number(dens, "density", 0, 0, 1e30); err != nil {
			return s, err
		}
		if s.Density <= 0 {
			return s, Errorf("density", "density must be positive")
		}
		s.HasDensity = true
	}
	if v := get("eta"); v != "" {
		if s.EtaEV, err = energy(v, "eta", 0); err != nil {
			return s, err
		}
		if !(s.EtaEV >= 1e-6 && s.EtaEV <= 10) {
			return s, Errorf("eta", "broadening %s out of range (1 µeV to 10 eV)", v)
		}
	}
	switch strings.ToLower(get("shape")) {
	case "", "gaussian":
		s.Shape = spectrum.Gaussian
	case "lorentzian":
		s.Shape = spectrum.Lorentzian
	default:
		return s, Errorf("shape", "unknown line shape %q (gaussian or lorentzian)", get("shape"))
	}
	if v := get("mfp"); v != "" {
		if s.MFPM, err = phys.ParseLength(v); err != nil {
			return s, Errorf("mfp", "%v", err)
		}
		if !(s.MFPM >= MinLengthM && s.MFPM <= MaxLengthM) {
			return s, Errorf("mfp", "mean free path %s out of range (0.1 nm to 1 m)", v)
		}
	}
	if v := get("at"); v != "" {
		parts := strings.Split(v, ",")
		if len(parts) > MaxAt {
			return s, Errorf("at", "%d energies (at most %d)", len(parts), MaxAt)
		}
		for _, p := range parts {
			e, err := energy(strings.TrimSpace(p), "at", 0)
			if err != nil {
				return s, err
			}
			s.AtEV = append(s.AtEV, e)
		}
		s.atSet = true
	}
	if s.Budget, err = number(get("budget"), "budget", DefaultBudget, 1, MaxBudget); err != nil {
		return s, err
	}
	return s, nil
}

func nonEmpty(vs []string) int {
	n := 0
	for _, v := range vs {
		if strings.TrimSpace(v) != "" {
			n++
		}
	}
	return n
}

func number(v, key string, def, lo, hi float64) (float64, error) {
	if v == "" {
		return def, nil
	}
	x, err := strconv.ParseFloat(v, 64)
	if err != nil || math.IsNaN(x) || math.IsInf(x, 0) {
		return 0, Errorf(key, "%q is not a number", v)
	}
	if x < lo || x > hi {
		return 0, Errorf(key, "%s out of range (%g to %g)", v, lo, hi)
	}
	return x, nil
}

func integer(v, key string, def, lo, hi int) (int, error) {
	if v == "" {
		return def, nil
	}
	x, err := strconv.Atoi(v)
	if err != nil {
		return 0, Errorf(key, "%q is not a whole number", v)
	}
	if x < lo || x > hi {
		return 0, Errorf(key, "%d out of range (%d to %d)", x, lo, hi)
	}
	return x, nil
}

func energy(v, key string, def float64) (float64, error) {
	if v == "" {
		return def, nil
	}
	e, err := phys.ParseEnergy(v)
	if err != nil {
		return 0, Errorf(key, "%v", err)
	}
	if e < MinEnergyEV || e > MaxEnergyEV {
		return 0, Errorf(key, "%s out of range (%g to %g eV)", v, float64(MinEnergyEV), float64(MaxEnergyEV))
	}
	return e, nil
}

func fmtFloat(x float64) string { return strconv.FormatFloat(x, 'g', -1, 64) }

// Values returns the scenario as canonical key-value pairs: every key that
// matters, in canonical units, defaults included. Equal scenarios give equal
// values; Encode gives the canonical query string.
func (s Scenario) Values() url.Values {
	q := url.Values{}
	q.Set("material", s.Material.ID)
	if s.Material.ID == material.CustomID {
		for i, k := range []string{"mx", "my", "mz"} {
			q.Set(k, fmtFloat(s.MassM0[i]))
		}
		q.Set("gv", strconv.Itoa(s.GV))
	}
	q.Set("gs", strconv.Itoa(s.GS))
	if s.AlphaPerEV != s.Material.AlphaPerEV || s.Material.ID == material.CustomID {
		q.Set("alpha", fmtFloat(s.AlphaPerEV))
	}
	q.Set("dims", strconv.Itoa(s.Dims))
	for i := 0; i < s.Dims; i++ {
		q.Set("l"+axisNames[i], phys.FormatLength(s.LengthM[i]))
		q.Set("b"+axisNames[i], s.BC[i].String())
	}
	q.Set("along", axisNames[s.Along])
	q.Set("emin", fmtFloat(s.EminEV))
	q.Set("emax", fmtFloat(s.EmaxEV))
	q.Set("points", strconv.Itoa(s.Points))
	q.Set("temp", fmtFloat(s.TempK))
	if s.HasDensity {
		q.Set("density", fmtFloat(s.Density))
	} else {
		q.Set("ef", fmtFloat(s.EFEV))
	}
	if s.EtaEV > 0 {
		q.Set("eta", fmtFloat(s.EtaEV))
	}
	if s.Shape == spectrum.Lorentzian {
		q.Set("shape", "lorentzian")
	}
	if s.MFPM > 0 {
		q.Set("mfp", phys.FormatLength(s.MFPM))
	}
	if s.atSet {
		parts := make([]string, len(s.AtEV))
		for i, e := range s.AtEV {
			parts[i] = fmtFloat(e)
		}
		q.Set("at", strings.Join(parts, ","))
	}
	if s.Budget != DefaultBudget {
		q.Set("budget", fmtFloat(s.Budget))
	}
	return q
}

// Canonical returns the canonical query string (keys sorted), the cache key
// and the shareable link of the scenario.
func (s Scenario) Canonical() string { return s.Values().Encode() }

// Conductor returns the engine's view of the scenario.
func (s Scenario) Conductor() spectrum.Conductor {
	c := spectrum.Conductor{SpinDegeneracy: s.GS, AlphaPerEV: s.AlphaPerEV}
	for i := 0; i < s.Dims; i++ {
		c.Axes = append(c.Axes, spectrum.Axis{LengthM: s.LengthM[i], BC: s.BC[i]})
	}
	for _, v := range s.Material.Valleys {
		c.Valleys = append(c.Valleys, spectrum.Valley{Label: v.Label, MassM0: v.MassM0, Degeneracy: v.Degeneracy})
	}
	return c
}

// KTEV returns k_B·T in eV.
func (s Scenario) KTEV() float64 { return s.TempK * phys.BoltzmannEV }

// Eta returns the broadening of the delta peaks of a fully confined
// conductor: the user's η, or by default k_B·T (the thermal smearing a
// measurement would see), but never below two grid steps.
func (s Scenario) Eta() float64 {
	if s.EtaEV > 0 {
		return s.EtaEV
	}
	step := (s.EmaxEV - s.EminEV) / float64(s.Points-1)
	return math.Max(s.KTEV(), 2*step)
}

// OpenAxes returns how many axes are open.
func (s Scenario) OpenAxes() int {
	n := 0
	for i := 0; i < s.Dims; i++ {
		if s.BC[i] == spectrum.Open {
			n++
		}
	}
	return n
}

// DensityUnit names the unit of carrier density: per volume, area or length
// of the open axes, or per conductor when every axis is confined.
func (s Scenario) DensityUnit() string {
	return [...]string{"per conductor", "cm^-1", "cm^-2", "cm^-3"}[s.OpenAxes()]
}

// densityScale converts a number of electrons to DensityUnit.
func (s Scenario) densityScale() float64 {
	m := 1.0
	for i := 0; i < s.Dims; i++ {
		if s.BC[i] == spectrum.Open {
			m *= s.LengthM[i] * 100 // cm
		}
	}
	return 1 / m
}

// String is a short human description: "GaAs, 10×10 nm box × 100 nm open".
func (s Scenario) String() string {
	var parts []string
	for i := 0; i < s.Dims; i++ {
		parts = append(parts, fmt.Sprintf("%s %s", phys.FormatLength(s.LengthM[i]), s.BC[i]))
	}
	return s.Material.ID + ", " + strings.Join(parts, " × ")
}
