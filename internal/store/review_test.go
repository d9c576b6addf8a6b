package store

import (
	"context"
	"errors"
	"fmt"
	"os"
	"slices"
	"strings"
	"sync"
	"testing"
	"time"
)

// sample is a valid review of our own: two candidate GaAs nanowires.
func sample(title string) Review {
	return Review{
		Title: title,
		Notes: "Compare a 10 nm box wire with its ring counterpart.\nCheck modes at E_F.",
		Scenarios: []string{
			"material=gaas&dims=3&lx=10nm&ly=10nm&lz=200nm&bx=box&by=box&bz=open",
			"material=gaas&dims=3&lx=10nm&ly=10nm&lz=200nm&bx=ring&by=ring&bz=open",
		},
	}
}

func countReviews(t testing.TB, s *Store) int {
	t.Helper()
	var n int
	if err := s.r.QueryRow(`SELECT count(*) FROM review`).Scan(&n); err != nil {
		t.Fatal(err)
	}
	return n
}

func countScenarios(t testing.TB, s *Store) int {
	t.Helper()
	var n int
	if err := s.r.QueryRow(`SELECT count(*) FROM review_scenario`).Scan(&n); err != nil {
		t.Fatal(err)
	}
	return n
}

func mkdirAll(dir string) error { return os.MkdirAll(dir, 0o755) }

func fileExists(path string) bool { _, err := os.Stat(path); return err == nil }

func TestCreateGet(t *testing.T) {
	s, _ := openTemp(t)
	ctx := context.Background()
	in := sample("InAs nanosheet, 5 nm")
	in.ID = 999                  // ignored
	in.Created = time.Unix(0, 0) // ignored
	before := time.Now().UTC()
	got, err := s.Create(ctx, in)
	if err != nil {
		t.Fatal(err)
	}
	after := time.Now().UTC()
	if got.ID <= 0 || got.ID == 999 {
		t.Errorf("ID = %d, want a new positive id", got.ID)
	}
	if got.Created.Before(before) || got.Created.After(after) || got.Created.Location() != time.UTC {
		t.Errorf("Created = %v, want UTC between %v and %v", got.Created, before, after)
	}
	read, err := s.Get(ctx, got.ID)
	if err != nil {
		t.Fatal(err)
	}
	if !equalReview(read, got) {
		t.Errorf("Get = %+v\nwant  %+v", read, got)
	}
	// The caller's slice is not shared with the returned review.
	in.Scenarios[0] = "changed"
	if got.Scenarios[0] == "changed" {
		t.Error("Create returned the caller's scenario slice")
	}
}

func equalReview(a, b Review) bool {
	return a.ID == b.ID && a.Title == b.Title && a.Notes == b.Notes &&
		slices.Equal(a.Scenarios, b.Scenarios) && a.Created.Equal(b.Created)
}

func TestScenariosKeepOrderAndText(t *testing.T) {
	s, _ := openTemp(t)
	ctx := context.Background()
	r := Review{Title: "eight", Scenarios: []string{
		"z=1", "a=2", "material=si&dims=2&lx=3nm", "m=%C3%85", "x=1&x=2", "q=a+b", "k=%26", "ünï=cödé",
	}}
	got, err := s.Create(ctx, r)
	if err != nil {
		t.Fatal(err)
	}
	read, err := s.Get(ctx, got.ID)
	if err != nil {
		t.Fatal(err)
	}
	if !slices.Equal(read.Scenarios, r.Scenarios) {
		t.Errorf("scenarios = %q, want %q", read.Scenarios, r.Scenarios)
	}
}

func TestGetNotFound(t *testing.T) {
	s, _ := openTemp(t)
	for _, id := range []int64{0, -1, 1, 1 << 62} {
		if _, err := s.Get(context.Background(), id); !errors.Is(err, ErrNotFound) {
			t.Errorf("Get(%d) error = %v, want ErrNotFound", id, err)
		}
	}
	if _, err := s.Export(context.Background(), 42); !errors.Is(err, ErrNotFound) {
		t.Errorf("Export(42) error = %v, want ErrNotFound", err)
	}
}

func TestListNewestFirstAndSearch(t *testing.T) {
	s, _ := openTemp(t)
	ctx := context.Background()
	titles := []string{
		"GaAs wire 10 nm",
		"100% box vs ring",
		"Cu line_width 20 nm",
		"gaas WELL",
		"cu line width 30 nm",
		`back\slash`,
		"Ångström films",
	}
	var ids []int64
	for _, ti := range titles {
		r, err := s.Create(ctx, sample(ti))
		if err != nil {
			t.Fatal(err)
		}
		ids = append(ids, r.ID)
	}
	titlesOf := func(rs []Review) []string {
		var out []string
		for _, r := range rs {
			out = append(out, r.Title)
		}
		return out
	}

	all, err := s.List(ctx, "", 0)
	if err != nil {
		t.Fatal(err)
	}
	want := slices.Clone(titles)
	slices.Reverse(want)
	if got := titlesOf(all); !slices.Equal(got, want) {
		t.Errorf("List all = %q, want newest first %q", got, want)
	}
	for i := 1; i < len(all); i++ {
		if all[i].Created.After(all[i-1].Created) {
			t.Errorf("List not ordered by Created at %d", i)
		}
	}
	for _, r := range all {
		if len(r.Scenarios) != 2 {
			t.Errorf("review %d listed with %d scenarios, want 2", r.ID, len(r.Scenarios))
		}
	}

	for _, c := range []struct {
		name, q string
		want    []string
	}{
		{"case-insensitive", "GAAS", []string{"gaas WELL", "GaAs wire 10 nm"}},
		{"percent is literal", "%", []string{"100% box vs ring"}},
		{"percent in context", "0% b", []string{"100% box vs ring"}},
		{"underscore is literal", "_", []string{"Cu line_width 20 nm"}},
		{"underscore not a wildcard", "line_w", []string{"Cu line_width 20 nm"}},
		{"backslash is literal", `\`, []string{`back\slash`}},
		{"non-ASCII case folding", "ångström", []string{"Ångström films"}},
		{"spaces trimmed", "  well ", []string{"gaas WELL"}},
		{"no match", "graphene", nil},
	} {
		t.Run(c.name, func(t *testing.T) {
			got, err := s.List(ctx, c.q, 10)
			if err != nil {
				t.Fatal(err)
			}
			if g := titlesOf(got); !slices.Equal(g, c.want) {
				t.Errorf("List(%q) = %q, want %q", c.q, g, c.want)
			}
		})
	}

	t.Run("limit", func(t *testing.T) {
		got, err := s.List(ctx, "", 3)
		if err != nil {
			t.Fatal(err)
		}
		if g := titlesOf(got); !slices.Equal(g, want[:3]) {
			t.Errorf("List limit 3 = %q, want %q", g, want[:3])
		}
	})
}

func TestListTiesByID(t *testing.T) {
	// Imported reviews keep their creation time, so equal times happen;
	// the later id then comes first.
	s, _ := openTemp(t)
	ctx := context.Background()
	at := time.Date(2025, 6, 1, 12, 0, 0, 0, time.UTC)
	var ids []int64
	for i := range 3 {
		r := sample(fmt.Sprintf("same time %d", i))
		r.Created = at
		got, err := s.insert(ctx, r)
		if err != nil {
			t.Fatal(err)
		}
		ids = append(ids, got.ID)
	}
	got, err := s.List(ctx, "same time", 0)
	if err != nil {
		t.Fatal(err)
	}
	for i, r := range got {
		if r.ID != ids[len(ids)-1-i] {
			t.Errorf("position %d: id %d, want %d", i, r.ID, ids[len(ids)-1-i])
		}
	}
}

func TestLimits(t *testing.T) {
	s, _ := openTemp(t)
	ctx := context.Background()
	many := func(n int) []string {
		out := make([]string, n)
		for i := range out {
			out[i] = fmt.Sprintf("material=gaas&lx=%dnm", i+1)
		}
		return out
	}
	with := func(f func(*Review)) Review { r := sample("limits"); f(&r); return r }

	accepted := []struct {
		name string
		r    Review
	}{
		{"title at limit", with(func(r *Review) { r.Title = strings.Repeat("é", MaxTitle) })},
		{"notes at limit", with(func(r *Review) { r.Notes = strings.Repeat("n", MaxNotes) })},
		{"notes empty", with(func(r *Review) { r.Notes = "" })},
		{"notes with tabs and CRLF", with(func(r *Review) { r.Notes = "a\tb\r\nc" })},
		{"scenarios at limit", with(func(r *Review) { r.Scenarios = many(MaxScenarios) })},
		{"scenario at limit", with(func(r *Review) { r.Scenarios = []string{"a=" + strings.Repeat("x", MaxScenarioLen-2)} })},
	}
	for _, c := range accepted {
		t.Run(c.name, func(t *testing.T) {
			got, err := s.Create(ctx, c.r)
			if err != nil {
				t.Fatalf("Create: %v", err)
			}
			read, err := s.Get(ctx, got.ID)
			if err != nil || !equalReview(read, got) {
				t.Errorf("Get = %+v, %v", read, err)
			}
		})
	}

	rejected := []struct {
		name  string
		r     Review
		field string
		index int
	}{
		{"empty title", with(func(r *Review) { r.Title = "" }), "title", -1},
		{"blank title", with(func(r *Review) { r.Title = " \t " }), "title", -1},
		{"title too long", with(func(r *Review) { r.Title = strings.Repeat("é", MaxTitle+1) }), "title", -1},
		{"title with newline", with(func(r *Review) { r.Title = "two\nlines" }), "title", -1},
		{"title invalid UTF-8", with(func(r *Review) { r.Title = "bad \xff" }), "title", -1},
		{"notes too long", with(func(r *Review) { r.Notes = strings.Repeat("n", MaxNotes+1) }), "notes", -1},
		{"notes too long in bytes", with(func(r *Review) { r.Notes = strings.Repeat("é", MaxNotes/2+1) }), "notes", -1},
		{"notes with NUL", with(func(r *Review) { r.Notes = "a\x00b" }), "notes", -1},
		{"no scenarios", with(func(r *Review) { r.Scenarios = nil }), "s", -1},
		{"too many scenarios", with(func(r *Review) { r.Scenarios = many(MaxScenarios + 1) }), "s", -1},
		{"empty scenario", with(func(r *Review) { r.Scenarios = []string{"a=1", ""} }), "s", 1},
		{"scenario too long", with(func(r *Review) { r.Scenarios = []string{"a=" + strings.Repeat("x", MaxScenarioLen-1)} }), "s", 0},
		{"scenario with space", with(func(r *Review) { r.Scenarios = []string{"a=1", "b=2", "c=3 4"} }), "s", 2},
	}
	before, beforeS := countReviews(t, s), countScenarios(t, s)
	for _, c := range rejected {
		t.Run(c.name, func(t *testing.T) {
			_, err := s.Create(ctx, c.r)
			if !errors.Is(err, ErrInvalid) {
				t.Fatalf("Create error = %v, want ErrInvalid", err)
			}
			var fe *FieldError
			if !errors.As(err, &fe) || fe.Field != c.field || fe.Index != c.index {
				t.Fatalf("error %v: field %+v, want %s[%d]", err, fe, c.field, c.index)
			}
			if !strings.HasPrefix(err.Error(), c.field) {
				t.Errorf("message %q does not start with the field %q", err, c.field)
			}
		})
	}
	if n, ns := countReviews(t, s), countScenarios(t, s); n != before || ns != beforeS {
		t.Errorf("rejected reviews wrote rows: %d→%d reviews, %d→%d scenarios", before, n, beforeS, ns)
	}
}

func TestSchemaChecksBackTheLimits(t *testing.T) {
	// Bypassing Validate, the CHECK constraints still refuse oversize rows.
	s, _ := openTemp(t)
	_, err := s.w.Exec(`INSERT INTO review (title, title_fold, notes, created) VALUES (?, '', '', '2026-01-01T00:00:00.000000000Z')`,
		strings.Repeat("t", MaxTitle+1))
	if err == nil {
		t.Error("schema accepted a 201-character title")
	}
}

func TestConcurrentCreates(t *testing.T) {
	// 24 goroutines over two stores on one file: within a store they queue
	// on the single writer connection, across stores SQLite's busy handler
	// makes them wait. None may fail with SQLITE_BUSY.
	s1, path := openTemp(t)
	s2, err := Open(context.Background(), path, Options{})
	if err != nil {
		t.Fatal(err)
	}
	defer s2.Close()
	const n = 24
	ids := make([]int64, n)
	errs := make([]error, n)
	var wg sync.WaitGroup
	for i := range n {
		wg.Add(1)
		go func() {
			defer wg.Done()
			st := s1
			if i%2 == 1 {
				st = s2
			}
			r, err := st.Create(context.Background(), sample(fmt.Sprintf("concurrent %02d", i)))
			ids[i], errs[i] = r.ID, err
		}()
	}
	wg.Wait()
	seen := map[int64]bool{}
	for i := range n {
		if errs[i] != nil {
			t.Errorf("Create %d: %v", i, errs[i])
			continue
		}
		if seen[ids[i]] {
			t.Errorf("id %d given twice", ids[i])
		}
		seen[ids[i]] = true
	}
	if got := countReviews(t, s1); got != n {
		t.Errorf("%d reviews stored, want %d", got, n)
	}
	if got := countScenarios(t, s1); got != 2*n {
		t.Errorf("%d scenarios stored, want %d", got, 2*n)
	}
}

func BenchmarkCreate(b *testing.B) {
	s, _ := openTemp(b)
	ctx := context.Background()
	r := sample("benchmark review")
	b.ReportAllocs()
	for b.Loop() {
		if _, err := s.Create(ctx, r); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkGet(b *testing.B) {
	s, _ := openTemp(b)
	ctx := context.Background()
	var ids []int64
	for i := range 100 {
		r, err := s.Create(ctx, sample(fmt.Sprintf("benchmark %d", i)))
		if err != nil {
			b.Fatal(err)
		}
		ids = append(ids, r.ID)
	}
	b.ReportAllocs()
	i := 0
	for b.Loop() {
		if _, err := s.Get(ctx, ids[i%len(ids)]); err != nil {
			b.Fatal(err)
		}
		i++
	}
}

func BenchmarkList(b *testing.B) {
	s, _ := openTemp(b)
	ctx := context.Background()
	for i := range 200 {
		if _, err := s.Create(ctx, sample(fmt.Sprintf("benchmark wire %d", i))); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportAllocs()
	for b.Loop() {
		if rs, err := s.List(ctx, "wire 1", DefaultListLimit); err != nil || len(rs) == 0 {
			b.Fatal(len(rs), err)
		}
	}
}

func TestCreateCanceled(t *testing.T) {
	s, _ := openTemp(t)
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := s.Create(ctx, sample("never saved")); !errors.Is(err, context.Canceled) {
		t.Errorf("Create with a canceled context: %v, want context.Canceled", err)
	}
	if n := countReviews(t, s); n != 0 {
		t.Errorf("%d reviews after a canceled Create, want 0", n)
	}
	// The single writer connection is still usable afterwards.
	if _, err := s.Create(context.Background(), sample("saved")); err != nil {
		t.Errorf("Create after a canceled one: %v", err)
	}
}
