package scenario

import (
	"context"
	"errors"
	"math"
	"net/url"
	"slices"
	"strconv"
	"strings"

	"ringbox/internal/lattice"
	"ringbox/internal/phys"
)

// LatticeKeys are the keys of `ringbox lattice` and GET /api/v1/lattice.
var LatticeKeys = []string{"structure", "lines", "n", "m", "gamma0", "acc", "gs", "ef", "temp", "at",
	"emin", "emax", "points", "kpoints"}

// Defaults of a lattice request that differ by structure.
const (
	defaultLatticeLines = 7  // the N = 7 armchair ribbon of DESIGN's check values
	defaultLatticeN     = 10 // the (10, 0) tube of DESIGN's check values
)

// LatticeRequest is a parsed, validated lattice request.
type LatticeRequest struct {
	Params lattice.Params
}

// ParseLattice reads a lattice request from URL query values (or form values,
// or CLI flags collected into url.Values). Empty values count as absent;
// lines applies to ribbons and n, m to tubes, and the other ones are
// ignored. Lengths take units (acc=0.142nm, 1.42A; bare numbers are nm),
// energies eV or meV (bare numbers are eV); at is a comma list of energies.
// An even kpoints is raised to the next odd number (the grid must hold k = 0
// and the zone edge). Every error names its key.
func ParseLattice(q url.Values) (LatticeRequest, error) {
	for k := range q {
		if !slices.Contains(LatticeKeys, k) {
			return LatticeRequest{}, Errorf(k, "unknown key")
		}
		n := 0
		for _, v := range q[k] {
			if strings.TrimSpace(v) != "" {
				n++
			}
		}
		if n > 1 {
			return LatticeRequest{}, Errorf(k, "given more than once")
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
	p := lattice.DefaultParams()
	var err error
	switch s := strings.ToLower(get("structure")); s {
	case "", "armchair":
		p.Structure = lattice.Armchair
	case "zigzag":
		p.Structure = lattice.Zigzag
	case "tube":
		p.Structure = lattice.Tube
	default:
		return LatticeRequest{}, Errorf("structure", "%q is not armchair, zigzag or tube", s)
	}
	if p.Structure == lattice.Tube {
		if p.N, err = integer(get("n"), "n", defaultLatticeN, 1, lattice.MaxTubeN); err != nil {
			return LatticeRequest{}, err
		}
		if p.M, err = integer(get("m"), "m", 0, 0, p.N); err != nil {
			return LatticeRequest{}, err
		}
		p.Lines = 0
	} else {
		if p.Lines, err = integer(get("lines"), "lines", defaultLatticeLines, 1, lattice.MaxLines); err != nil {
			return LatticeRequest{}, err
		}
		p.N, p.M = 0, 0
	}
	if p.Gamma0EV, err = latticeEnergy(get("gamma0"), "gamma0", lattice.DefaultGamma0EV, 1e-3, 20); err != nil {
		return LatticeRequest{}, err
	}
	if v := get("acc"); v != "" {
		m, err := phys.ParseLength(v)
		if err != nil {
			return LatticeRequest{}, Errorf("acc", "%v", err)
		}
		nm := roundSig(m * 1e9)
		if !(nm >= 0.05 && nm <= 1) {
			return LatticeRequest{}, Errorf("acc", "%s out of range (0.05 to 1 nm)", v)
		}
		p.AccNM = nm
	}
	if p.Gs, err = integer(get("gs"), "gs", 2, 1, 2); err != nil {
		return LatticeRequest{}, err
	}
	e := lattice.MaxEnergyEV
	if p.EFEV, err = latticeEnergy(get("ef"), "ef", 0, -e, e); err != nil {
		return LatticeRequest{}, err
	}
	if p.TempK, err = number(get("temp"), "temp", 300, 0, lattice.MaxTempK); err != nil {
		return LatticeRequest{}, err
	}
	if v := get("at"); v != "" {
		parts := strings.Split(v, ",")
		if len(parts) > lattice.MaxAt {
			return LatticeRequest{}, Errorf("at", "at most %d energies, got %d", lattice.MaxAt, len(parts))
		}
		for _, s := range parts {
			x, err := latticeEnergy(strings.TrimSpace(s), "at", math.NaN(), -e, e)
			if err != nil {
				return LatticeRequest{}, err
			}
			if math.IsNaN(x) {
				return LatticeRequest{}, Errorf("at", "empty energy in the list %q", v)
			}
			p.AtEV = append(p.AtEV, x)
		}
	}
	if p.EMinEV, err = latticeEnergy(get("emin"), "emin", -3, -e, e); err != nil {
		return LatticeRequest{}, err
	}
	if p.EMaxEV, err = latticeEnergy(get("emax"), "emax", 3, -e, e); err != nil {
		return LatticeRequest{}, err
	}
	if p.EMaxEV <= p.EMinEV {
		return LatticeRequest{}, Errorf("emax", "must be above emin (%g eV)", p.EMinEV)
	}
	if p.Points, err = integer(get("points"), "points", 600, 2, lattice.MaxPoints); err != nil {
		return LatticeRequest{}, err
	}
	if p.KPoints, err = integer(get("kpoints"), "kpoints", 401, lattice.MinKPoints, lattice.MaxKPoints); err != nil {
		return LatticeRequest{}, err
	}
	if p.KPoints%2 == 0 {
		p.KPoints++
	}
	if err := p.Validate(); err != nil {
		return LatticeRequest{}, fromLatticeError(err)
	}
	return LatticeRequest{Params: p}, nil
}

// Values returns the request as canonical key-value pairs: every key that
// matters for the structure, in canonical units (eV, nm, K), defaults
// included.
func (r LatticeRequest) Values() url.Values {
	p := r.Params
	q := url.Values{}
	q.Set("structure", string(p.Structure))
	if p.Structure == lattice.Tube {
		q.Set("n", strconv.Itoa(p.N))
		q.Set("m", strconv.Itoa(p.M))
	} else {
		q.Set("lines", strconv.Itoa(p.Lines))
	}
	q.Set("gamma0", fmtFloat(p.Gamma0EV))
	q.Set("acc", fmtFloat(p.AccNM))
	q.Set("gs", strconv.Itoa(p.Gs))
	q.Set("ef", fmtFloat(p.EFEV))
	q.Set("temp", fmtFloat(p.TempK))
	if len(p.AtEV) > 0 {
		at := make([]string, len(p.AtEV))
		for i, e := range p.AtEV {
			at[i] = fmtFloat(e)
		}
		q.Set("at", strings.Join(at, ","))
	}
	q.Set("emin", fmtFloat(p.EMinEV))
	q.Set("emax", fmtFloat(p.EMaxEV))
	q.Set("points", strconv.Itoa(p.Points))
	q.Set("kpoints", strconv.Itoa(p.KPoints))
	return q
}

// Canonical returns the canonical query string (keys sorted, values in
// canonical units), the cache key of the request: equal requests give equal
// strings, and ParseLattice(Canonical) gives the request back.
func (r LatticeRequest) Canonical() string { return r.Values().Encode() }

// RunLattice computes the request. Errors are *Error: Invalid or TooLarge
// naming the key, or Canceled when ctx ends.
func RunLattice(ctx context.Context, r LatticeRequest) (lattice.Result, error) {
	res, err := lattice.Compute(ctx, r.Params)
	if err != nil {
		return lattice.Result{}, fromLatticeError(err)
	}
	return res, nil
}

// fromLatticeError maps the lattice package's errors onto coded errors.
func fromLatticeError(err error) error {
	var pe *lattice.ParamError
	switch {
	case errors.As(err, &pe):
		code := Invalid
		if pe.TooLarge {
			code = TooLarge
		}
		return &Error{Code: code, Key: pe.Field, Msg: pe.Msg}
	case errors.Is(err, context.Canceled), errors.Is(err, context.DeadlineExceeded):
		return &Error{Code: Canceled, Msg: "lattice calculation stopped: " + err.Error()}
	}
	return err
}

func latticeEnergy(v, key string, def, lo, hi float64) (float64, error) {
	if v == "" {
		return def, nil
	}
	e, err := phys.ParseEnergy(v)
	if err != nil {
		return 0, Errorf(key, "%v", err)
	}
	e = roundSig(e)
	if e < lo || e > hi {
		return 0, Errorf(key, "%s out of range (%g to %g eV)", v, lo, hi)
	}
	return e, nil
}

// roundSig rounds x to 12 significant digits, so that a value converted
// from other units ("25meV", "1.42A") reads back from its canonical form
// unchanged instead of a rounding step away.
func roundSig(x float64) float64 {
	y, _ := strconv.ParseFloat(strconv.FormatFloat(x, 'g', 12, 64), 64)
	return y
}
