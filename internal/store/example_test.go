package store_test

import (
	"context"
	"errors"
	"fmt"
	"os"
	"path/filepath"

	"ringbox/internal/store"
)

func Example() {
	dir, _ := os.MkdirTemp("", "ringbox-store-example")
	defer os.RemoveAll(dir)
	ctx := context.Background()

	s, err := store.Open(ctx, filepath.Join(dir, "reviews.db"), store.Options{})
	if err != nil {
		fmt.Println(err)
		return
	}
	defer s.Close()

	r, err := s.Create(ctx, store.Review{
		Title: "InSb quantum well: box or ring?",
		Notes: "Check N(E) below 50 meV.",
		Scenarios: []string{
			"material=insb&dims=1&lx=20nm&bx=box",
			"material=insb&dims=1&lx=20nm&bx=ring",
		},
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	found, _ := s.List(ctx, "QUANTUM well", 10)
	fmt.Println(len(found), found[0].Title, len(found[0].Scenarios))

	_, err = s.Create(ctx, store.Review{Title: " ", Scenarios: r.Scenarios})
	var fe *store.FieldError
	fmt.Println(errors.Is(err, store.ErrInvalid), errors.As(err, &fe) && fe.Field == "title", err)
	// Output:
	// 1 InSb quantum well: box or ring? 2
	// true true title: must not be empty
}
