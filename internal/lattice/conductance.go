package lattice

import (
	"context"
	"sort"

	"ringbox/internal/phys"
	"ringbox/internal/thermal"
)

// conductance fills in the Landauer conductance of a ballistic conductor,
// G = (e²/h)·∫M(E)(−∂f/∂E)dE (Landauer–Büttiker, transmission 1 per mode),
// using thermal.Occupied for the thermal average.
//
// thermal.Occupied takes non-decreasing curves, and M(E) of a lattice falls
// where bands end, so M is split into the two staircases it is the
// difference of: U(E) = #{run starts lo < E} and D(E) = #{run ends hi < E},
// M = g_s·(U − D). Each is shifted by its value just below the thermal
// window, which keeps the magnitudes (and so the relative error bounds)
// small; the shifts add back as the integer M there.
func conductance(ctx context.Context, sp *spectrum, p Params, obs *Observables) error {
	kT := thermal.KT(p.TempK)
	base := p.EFEV - 2*thermal.DefaultWindowKT*kT
	u0 := sort.SearchFloat64s(sp.los, base)
	d0 := sort.SearchFloat64s(sp.his, base)
	staircase := func(edges []float64, offset int) thermal.Curve {
		return func(ctx context.Context, energies, out []float64) error {
			if err := ctx.Err(); err != nil {
				return err
			}
			for i, e := range energies {
				out[i] = float64(sort.SearchFloat64s(edges, e) - offset)
			}
			return nil
		}
	}
	up, upErr, err := thermal.Occupied(ctx, staircase(sp.los, u0), p.EFEV, kT)
	if err != nil {
		return err
	}
	down, downErr, err := thermal.Occupied(ctx, staircase(sp.his, d0), p.EFEV, kT)
	if err != nil {
		return err
	}
	perSpin := float64(u0-d0) + up - down
	gs := float64(p.Gs)
	obs.ConductanceQuanta = gs * perSpin
	obs.ConductanceS = phys.ConductanceQuantumPerSpin * gs * perSpin
	obs.ConductanceErrS = phys.ConductanceQuantumPerSpin * gs * (upErr + downErr)
	return nil
}
