package similarity_test

import (
	"fmt"

	"scalematch/similarity"
)

func ExampleParseQuantity() {
	for _, s := range []string{"35000 ft", "250 kt", "45 psf", "15 degC", "300 in*lbf"} {
		v, dim, err := similarity.ParseQuantity(s)
		if err != nil {
			fmt.Println(err)
			continue
		}
		fmt.Printf("%-11s %.4g (%v)\n", s, v, dim)
	}
	// Output:
	// 35000 ft    1.067e+04 (L)
	// 250 kt      128.6 (L T^-1)
	// 45 psf      2155 (M L^-1 T^-2)
	// 15 degC     288.1 (Θ)
	// 300 in*lbf  33.9 (M L^2 T^-2)
}

func ExampleToSI() {
	v, _ := similarity.ToSI("18 degF", "dK")
	fmt.Printf("%.4g K\n", v)
	_, err := similarity.ToSI("35000 ft", "Pa")
	fmt.Println(err)
	// Output:
	// 10 K
	// unit "ft" is a length (L); the field wants a pressure (M L^-1 T^-2, e.g. Pa)
}

func ExampleGroups() {
	dim := func(s string) similarity.Dimension {
		d, _ := similarity.ParseDimension(s)
		return d
	}
	res, err := similarity.Groups([]similarity.Variable{
		{Name: "R", Dim: dim("M L T^-2")},
		{Name: "rho", Dim: dim("M L^-3")},
		{Name: "V", Dim: dim("L T^-1")},
		{Name: "L", Dim: dim("L")},
		{Name: "mu", Dim: dim("M L^-1 T^-1")},
	}, []string{"rho", "V", "L"})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println("rank", res.Rank)
	for _, g := range res.Groups {
		fmt.Printf("%s: %s\n", g.KnownAs, g)
	}
	// Output:
	// rank 3
	// force coefficient: R rho^-1 V^-2 L^-2
	// inverse Reynolds number (1/Re): mu rho^-1 V^-1 L^-1
}
