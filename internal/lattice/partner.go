package lattice

import (
	"context"
	"fmt"
)

// Partner summarises the rolled-up (for a ribbon) or unrolled (for a tube)
// counterpart of a structure, computed with the same model, grids, E_F and T:
// the lattice version of box (ribbon, hard edges) against ring (tube,
// periodic circumference).
type Partner struct {
	Structure    Structure `json:"structure"` // "none" for chiral tubes
	Lines        int       `json:"lines,omitempty"`
	N            *int      `json:"n,omitempty"`
	M            *int      `json:"m,omitempty"`
	Exact        bool      `json:"exact"`
	Note         string    `json:"note"`
	WidthNM      *float64  `json:"width_nm,omitempty"`
	DiameterNM   *float64  `json:"diameter_nm,omitempty"`
	GapEV        float64   `json:"gap_eV"`
	Metallic     bool      `json:"metallic"`
	Family       int       `json:"family"`
	ModesAtEF    int       `json:"modes_at_ef"`
	ConductanceS float64   `json:"conductance_S"`
}

// PartnerParams returns the counterpart of p and whether it is exact.
//
// The mapping follows the geometry of rolling up. An armchair ribbon's axis is
// an armchair direction and its N dimer lines are stacked along the
// perpendicular zigzag direction, a/2 apart (a = √3·a_cc). Rolling it so the
// width closes on itself makes the circumference a zigzag direction,
// C_h = n·a1: the zigzag tube (n, 0), whose axis is the armchair direction
// with the same period 3a_cc and whose circumference n·a holds 2n dimer
// lines. So N dimer lines ↔ (N/2, 0), with 2N atoms per cell on both sides;
// the transverse phases are θ_p = pπ/(N+1) (box) against θ_q = qπ/n =
// 2πq/N (ring). Likewise a zigzag ribbon's axis is a zigzag direction and its
// chains are stacked 3a_cc/2 apart along the armchair direction; rolled up it
// is the armchair tube (n, n), with period a and circumference 3n·a_cc
// holding 2n chains: N chains ↔ (N/2, N/2) (Saito, Dresselhaus &
// Dresselhaus 1998, ch. 3, for the tube geometry; Nakada et al. 1996 for the
// ribbons).
//
// An odd N has no exact partner. We take n = (N+1)/2: the armchair ribbon's
// standing waves vanish on the missing lines 0 and N+1, so its box is N+1
// lines long, and the (N+1)/2 tube is the ring of that same length, whose
// phases 2πq/(N+1) are the even-p subset of the ribbon's pπ/(N+1). The same
// rounding is used for zigzag ribbons, by convention. A tube (n, 0) unrolls
// to the armchair ribbon of 2n lines and (n, n) to the zigzag ribbon of 2n
// chains; a chiral tube unrolls to a chiral ribbon, which is not modelled.
func PartnerParams(p Params) (q Params, exact bool, note string, ok bool) {
	q = p
	q.AtEV = nil
	switch p.Structure {
	case Armchair, Zigzag:
		n := (p.Lines + 1) / 2
		exact = p.Lines%2 == 0
		q.Structure, q.N, q.M = Tube, n, 0
		kind := "zigzag"
		if p.Structure == Zigzag {
			q.M = n
			kind = "armchair"
		}
		if exact {
			note = fmt.Sprintf("the %s ribbon of %d rolled up: the %s tube (%d, %d)", p.Structure, p.Lines, kind, q.N, q.M)
		} else {
			note = fmt.Sprintf("odd N = %d has no exact rolled-up partner; nearest taken, (N+1)/2 = %d: the %s tube (%d, %d)",
				p.Lines, n, kind, q.N, q.M)
		}
		if q.N > MaxTubeN {
			return q, false, fmt.Sprintf("the rolled-up tube (%d, %d) is beyond the tube bound n ≤ %d", q.N, q.M, MaxTubeN), false
		}
	case Tube:
		switch {
		case p.M == 0:
			q.Structure, q.Lines = Armchair, 2*p.N
			note = fmt.Sprintf("the zigzag tube (%d, 0) unrolled: the armchair ribbon of %d dimer lines", p.N, 2*p.N)
		case p.M == p.N:
			q.Structure, q.Lines = Zigzag, 2*p.N
			note = fmt.Sprintf("the armchair tube (%d, %d) unrolled: the zigzag ribbon of %d chains", p.N, p.N, 2*p.N)
		default:
			return q, false, "a chiral tube unrolls to a chiral ribbon, which is not modelled", false
		}
		exact = true
	default:
		panic("lattice: unknown structure " + string(p.Structure))
	}
	return q, exact, note, true
}

func partnerOf(ctx context.Context, p Params) (Partner, error) {
	q, exact, note, ok := PartnerParams(p)
	if !ok {
		return Partner{Structure: "none", Note: note}, nil
	}
	if err := q.Validate(); err != nil {
		return Partner{Structure: "none", Note: note + "; not computed: " + err.Error()}, nil
	}
	r, err := compute(ctx, q)
	if err != nil {
		return Partner{}, err
	}
	return Partner{
		Structure:    r.Structure,
		Lines:        r.Lines,
		N:            r.N,
		M:            r.M,
		Exact:        exact,
		Note:         note,
		WidthNM:      r.WidthNM,
		DiameterNM:   r.DiameterNM,
		GapEV:        r.GapEV,
		Metallic:     r.Metallic,
		Family:       r.Family,
		ModesAtEF:    r.Observables.ModesAtEF,
		ConductanceS: r.Observables.ConductanceS,
	}, nil
}
