package web

import (
	"net/http"
	"net/url"

	"github.com/go-chi/chi/v5"

	"ringbox/web/views"
)

// Worked examples: scenarios of our own that a device engineer would
// recognise, each a link that opens the conductor or lattice page filled in.

func init() {
	addRoutes(func(a *App, r chi.Router) {
		r.Get("/examples", a.handle(a.examplesPage))
	})
}

// Example is one worked example: a page ("/" for the conductor page,
// "/lattice" for graphene) and its query, with what it shows.
type Example struct {
	ID    string // stable identifier, used as the list's anchor
	Title string
	Page  string // "/" or "/lattice"
	Query string // the page's query string, without "?"
	Shows string // one sentence on what the example shows
}

// Href returns the link that opens the example's page filled in.
func (e Example) Href() string { return e.Page + "?" + e.Query }

// Values returns the example's query as key-value pairs.
func (e Example) Values() url.Values {
	q, err := url.ParseQuery(e.Query)
	if err != nil {
		panic("web: example " + e.ID + ": " + err.Error())
	}
	return q
}

// examples are built once; Examples returns a copy, so callers may keep it.
var examples = []Example{
	{
		ID:    "inas-nanowire",
		Title: "InAs nanowire, 20 nm × 20 nm, 1 µm long",
		Page:  "/",
		Query: "material=inas&dims=3&lx=20nm&ly=20nm&lz=1um&bx=box&by=box&bz=open&along=z&ef=0.15&temp=300",
		Shows: "The light InAs mass (0.026 m₀, Kane band) leaves only a few subbands below 0.15 eV: the ballistic conductance is about 2.4 × 2e²/h with hard walls and nearly twice that with periodic ones, so the boundary condition matters as much as the size.",
	},
	{
		ID:    "cu-line",
		Title: "Cu interconnect line, 10 nm × 20 nm, 1 µm long",
		Page:  "/",
		Query: "material=cu&dims=3&lx=10nm&ly=20nm&lz=1um&bx=box&by=box&bz=open&along=z&mfp=40nm&temp=300",
		Shows: "Thousands of modes at 7 eV make the ballistic (Sharvin) conductance large; a 40 nm mean free path (about copper's at room temperature, common practice) brings the Landauer–Büttiker line conductance down by λ/(λ + L).",
	},
	{
		ID:    "si-nanosheet",
		Title: "Si nanosheet, 5 nm thick, at 5×10¹² cm⁻²",
		Page:  "/",
		Query: "material=si&dims=3&lx=5nm&ly=1um&lz=1um&bx=box&by=open&bz=open&along=z&density=5e12&temp=300",
		Shows: "Confinement across 5 nm lifts the four in-plane X valleys above the two with the heavy mass across the sheet, so the Fermi level for a given sheet density differs from the bulk estimate.",
	},
	{
		ID:    "gaas-qpc",
		Title: "GaAs quantum point contact, 250 nm wide, at 1.5 K",
		Page:  "/",
		Query: "material=gaas&dims=2&lx=250nm&ly=500nm&bx=box&by=open&along=y&emin=0&emax=0.012&ef=5meV&temp=1.5",
		Shows: "The mode count steps by one at each transverse level, so the conductance rises in plateaus of 2e²/h as the Fermi level moves, the staircase of a split-gate constriction.",
	},
	{
		ID:    "gaas-well",
		Title: "GaAs quantum well, 10 nm, at 10¹² cm⁻² and 77 K",
		Page:  "/",
		Query: "material=gaas&dims=3&lx=10nm&ly=1um&lz=1um&bx=box&by=open&bz=open&along=z&density=1e12&temp=77",
		Shows: "The density of states is a staircase of m*/(πħ²) steps, one per subband; the carriers sit in the lowest subband, far from the bulk √E curve.",
	},
	{
		ID:    "tube-10-0",
		Title: "Semiconducting (10,0) nanotube",
		Page:  "/lattice",
		Query: "structure=tube&n=10&m=0&ef=0&temp=300",
		Shows: "Zone folding gives a gap of about 0.95 eV, so the tube carries no current at charge neutrality; its unrolled partner is the 20-line armchair ribbon.",
	},
	{
		ID:    "tube-6-6",
		Title: "Metallic (6,6) armchair nanotube",
		Page:  "/lattice",
		Query: "structure=tube&n=6&m=6&ef=0&temp=300",
		Shows: "Two bands cross at E = 0, so the tube has two channels per spin and conducts 4e²/h ≈ 155 µS, while its partner, the 12-chain zigzag ribbon, carries edge states instead.",
	},
	{
		ID:    "armchair-7",
		Title: "Armchair graphene ribbon, 7 dimer lines",
		Page:  "/lattice",
		Query: "structure=armchair&lines=7&ef=0&temp=300",
		Shows: "A ribbon about 0.74 nm wide has a gap of about 1.27 eV in nearest-neighbour tight binding; N = 3j + 2 ribbons would be metallic instead.",
	},
}

// Examples returns the worked examples, in the order the examples page
// lists them.
func Examples() []Example { return append([]Example(nil), examples...) }

// examplesPage renders /examples.
func (a *App) examplesPage(w http.ResponseWriter, r *http.Request) error {
	items := make([]views.ExampleItem, len(examples))
	for i, e := range examples {
		page := "conductor page"
		if e.Page == "/lattice" {
			page = "lattice page"
		}
		items[i] = views.ExampleItem{ID: e.ID, Title: e.Title, Href: e.Href(), Page: page, Shows: e.Shows}
	}
	return render(w, r, http.StatusOK, views.Page("Worked examples", views.NavExamples, views.ExamplesBody(items)))
}
