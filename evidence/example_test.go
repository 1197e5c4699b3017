package evidence_test

import (
	"fmt"
	"math/rand/v2"

	"wxstress/evidence"
)

func ExampleEvaluate() {
	// Thirty invented years of Kestrel Bay heating degree days, each
	// forecast by 500 simulated values from a model whose spread is half
	// the real one.
	rng := rand.New(rand.NewPCG(1, 2))
	cases := make([]evidence.Case, 30)
	for i := range cases {
		sample := make([]float64, 500)
		for j := range sample {
			sample[j] = 4200 + 150*rng.NormFloat64()
		}
		cases[i] = evidence.Case{Sample: sample, Observed: 4200 + 300*rng.NormFloat64()}
	}
	b, err := evidence.Evaluate(cases)
	if err != nil {
		panic(err)
	}
	fmt.Println(b.Verdict)
	fmt.Printf("model CRPS %.0f, climatology %.0f\n", b.MeanCRPS, b.MeanRefCRPS)
	// Output:
	// too narrow: realised values fall outside the 90 % band 8 of 30 times (expected 3)
	// model CRPS 124, climatology 118
}

func ExampleShortfall() {
	rng := rand.New(rand.NewPCG(3, 4))
	paths := make([]float64, 10_000)
	for i := range paths {
		paths[i] = 4200 + 300*rng.NormFloat64()
	}
	es := evidence.Shortfall(paths, 0.01, true)
	fmt.Printf("ES99 %.0f ± %.0f from %d paths\n", es.Value, es.SE, es.K)
	fmt.Println("paths for ± 5:", evidence.PathsNeeded(es.SE, len(paths), 5))
	// Output:
	// ES99 4998 ± 14 from 100 paths
	// paths for ± 5: 73965
}
