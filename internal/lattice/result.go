package lattice

import (
	"cmp"
	"context"
	"fmt"
	"math"
	"slices"
)

// Result is the JSON answer of `ringbox lattice` and GET /api/v1/lattice.
// Every number in it is finite. Energies are in eV from charge neutrality,
// lengths in nm, D(E) in states per eV per nm of length and M(E) in
// channels; both include the spin degeneracy g_s.
type Result struct {
	Structure Structure `json:"structure"`
	Lines     int       `json:"lines,omitempty"` // ribbons
	N         *int      `json:"n,omitempty"`     // tubes
	M         *int      `json:"m,omitempty"`     // tubes

	Gamma0EV float64 `json:"gamma0_eV"`
	AccNM    float64 `json:"acc_nm"`
	Gs       int     `json:"gs"`
	EFEV     float64 `json:"ef_eV"`
	TempK    float64 `json:"temp_K"`

	WidthNM         *float64 `json:"width_nm,omitempty"`    // ribbons
	DiameterNM      *float64 `json:"diameter_nm,omitempty"` // tubes
	PeriodNM        float64  `json:"period_nm"`             // length of the 1D unit cell
	AtomsPerCell    int      `json:"atoms_per_cell"`
	HexagonsPerCell int      `json:"hexagons_per_cell,omitempty"` // tubes

	GapEV    float64 `json:"gap_eV"`
	Metallic bool    `json:"metallic"`
	// Family is N mod 3 (ribbons) or (n − m) mod 3 (tubes): the three
	// families of the gap against size.
	Family int `json:"family"`

	At          []Point     `json:"at"`
	Observables Observables `json:"observables"`
	Partner     Partner     `json:"partner"`
	Bands       Bands       `json:"bands"`
	Curves      Curves      `json:"curves"`
	FamilyView  FamilyView  `json:"family_view"`

	// DOSMethod says how D(E) was obtained from the sampled bands.
	DOSMethod string   `json:"dos_method"`
	Notes     []string `json:"notes,omitempty"`
}

// Point holds the values at one energy.
type Point struct {
	EnergyEV float64 `json:"energy_eV"`
	Modes    int     `json:"modes"` // right-moving channels, spin included
	DOS      float64 `json:"dos"`   // states / (eV·nm), spin included, averaged over one bin width
}

// Observables are the values at (E_F, T).
type Observables struct {
	// ConductanceS is G = (e²/h)·∫M(E)(−∂f/∂E)dE, the Landauer conductance of
	// a ballistic conductor (transmission 1), in S.
	ConductanceS float64 `json:"conductance_S"`
	// ConductanceErrS bounds the quadrature error of ConductanceS.
	ConductanceErrS float64 `json:"conductance_error_S"`
	// ConductanceQuanta is G in units of e²/h.
	ConductanceQuanta float64 `json:"conductance_e2_per_h"`
	ModesAtEF         int     `json:"modes_at_ef"`
	DOSAtEF           float64 `json:"dos_at_ef"` // states / (eV·nm)
}

// Bands are the bands nearest E = 0 on the k grid, for plotting.
type Bands struct {
	KPerNM   []float64   `json:"k_per_nm"`
	EnergyEV [][]float64 `json:"energy_eV"` // [band][k], ascending by band
	Shown    int         `json:"shown"`
	Total    int         `json:"total"`
}

// Curves are D(E) and M(E) on the energy grid (bin centres).
type Curves struct {
	EnergyEV []float64 `json:"energy_eV"`
	DOS      []float64 `json:"dos"`
	Modes    []int     `json:"modes"`
	BinEV    float64   `json:"bin_eV"`
}

// maxPlotBands is how many bands with E ≥ 0 (and as many mirror bands) are
// returned for plotting: the ones reaching closest to E = 0.
const maxPlotBands = 40

// Compute runs the calculation p describes, with its partner and family view.
func Compute(ctx context.Context, p Params) (Result, error) {
	if err := p.Validate(); err != nil {
		return Result{}, err
	}
	r, err := compute(ctx, p)
	if err != nil {
		return Result{}, err
	}
	r.Partner, err = partnerOf(ctx, p)
	if err != nil {
		return Result{}, err
	}
	r.FamilyView, err = familyAround(ctx, p)
	if err != nil {
		return Result{}, err
	}
	return r, nil
}

// compute is Compute without the partner and family view.
func compute(ctx context.Context, p Params) (Result, error) {
	g := geometryOf(p)
	s := kGrid(p.KPoints)
	nb := g.atoms / 2
	flat := make([]float64, nb*len(s))
	upper := make([][]float64, nb)
	for b := range upper {
		upper[b] = flat[b*len(s) : (b+1)*len(s)]
	}
	if err := g.sample(ctx, s, upper); err != nil {
		return Result{}, err
	}
	h := (p.EMaxEV - p.EMinEV) / float64(p.Points)
	at := append([]float64{p.EFEV}, p.AtEV...)
	windows := make([][2]float64, len(at))
	for i, e := range at {
		windows[i] = [2]float64{e - h/2, e + h/2}
	}
	perLength := float64(p.Gs) / (2 * math.Pi * g.periodNM)
	sp, err := analyse(ctx, g, s, upper, perLength, snapFraction*p.Gamma0EV, p.EMinEV, p.EMaxEV, p.Points, windows)
	if err != nil {
		return Result{}, err
	}

	r := Result{
		Structure:    p.Structure,
		Gamma0EV:     p.Gamma0EV,
		AccNM:        p.AccNM,
		Gs:           p.Gs,
		EFEV:         p.EFEV,
		TempK:        p.TempK,
		PeriodNM:     g.periodNM,
		AtomsPerCell: g.atoms,
		GapEV:        2 * sp.minUpperEV,
		Metallic:     sp.minUpperEV == 0,
		DOSMethod: fmt.Sprintf("piecewise-linear interpolation of the bands between %d k points "+
			"(extrema refined), averaged over bins of %.6g eV", p.KPoints, h),
	}
	switch p.Structure {
	case Armchair, Zigzag:
		r.Lines = p.Lines
		r.WidthNM = ptr(g.widthNM)
		r.Family = p.Lines % 3
	case Tube:
		r.N, r.M = ptr(p.N), ptr(p.M)
		r.DiameterNM = ptr(g.diameterNM)
		r.HexagonsPerCell = g.hexagons
		r.Family = (p.N - p.M) % 3
	}
	if p.Structure == Zigzag {
		r.Notes = append(r.Notes, "zigzag ribbons carry a flat band of edge states at E = 0 for 2π/3 ≤ |k|a ≤ π "+
			"(Fujita et al. 1996); M(0) counts only its dispersive part")
	}

	pointAt := func(i int) Point {
		e := at[i]
		return Point{EnergyEV: e, Modes: p.Gs * sp.modesPerSpin(e), DOS: sp.winStates[i] / h}
	}
	ef := pointAt(0)
	r.At = make([]Point, 0, len(p.AtEV))
	for i := 1; i < len(at); i++ {
		r.At = append(r.At, pointAt(i))
	}
	r.Observables.ModesAtEF = ef.Modes
	r.Observables.DOSAtEF = ef.DOS
	if err := conductance(ctx, sp, p, &r.Observables); err != nil {
		return Result{}, err
	}

	r.Curves = Curves{
		EnergyEV: make([]float64, p.Points),
		DOS:      make([]float64, p.Points),
		Modes:    make([]int, p.Points),
		BinEV:    h,
	}
	for j := range r.Curves.EnergyEV {
		e := p.EMinEV + (float64(j)+0.5)*h
		r.Curves.EnergyEV[j] = e
		r.Curves.DOS[j] = sp.bins[j] / h
		r.Curves.Modes[j] = p.Gs * sp.modesPerSpin(e)
	}
	r.Bands = plotBands(s, g.periodNM, upper)
	return r, nil
}

// snapFraction·γ0 is the distance from zero below which a band extremum is
// taken as touching E = 0 (see analyse). The smallest true gap within the
// bounds (a 2000-line ribbon, a 15-nm tube) is above 10⁻³·γ0.
const snapFraction = 1e-9

func ptr[T any](v T) *T { return &v }

func plotBands(s []float64, periodNM float64, upper [][]float64) Bands {
	k := make([]float64, len(s))
	for i, si := range s {
		k[i] = si / periodNM
	}
	idx := make([]int, len(upper))
	mins := make([]float64, len(upper))
	for b, e := range upper {
		idx[b] = b
		mins[b] = slices.Min(e)
	}
	slices.SortStableFunc(idx, func(a, b int) int { return cmp.Compare(mins[a], mins[b]) })
	idx = idx[:min(len(idx), maxPlotBands)]
	out := make([][]float64, 0, 2*len(idx))
	for i := len(idx) - 1; i >= 0; i-- {
		e := upper[idx[i]]
		neg := make([]float64, len(e))
		for j, v := range e {
			neg[j] = -v
		}
		out = append(out, neg)
	}
	for _, b := range idx {
		out = append(out, slices.Clone(upper[b]))
	}
	return Bands{KPerNM: k, EnergyEV: out, Shown: len(out), Total: 2 * len(upper)}
}
