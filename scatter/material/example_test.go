package material_test

import (
	"fmt"

	"gopkg.in/yaml.v3"

	"github.com/fluctus/fluctus/scatter/material"
)

func ExampleParse() {
	// A material as written in a job file.
	var spec any
	if err := yaml.Unmarshal([]byte(`{drude: {plasma_eV: 9, damping_eV: 0.035}}`), &spec); err != nil {
		fmt.Println(err)
		return
	}
	m, err := material.Parse(spec, ".")
	if err != nil {
		fmt.Println(err)
		return
	}
	xi := material.FromEV(1) // imaginary frequency of 1 eV, rad/s
	fmt.Printf("%s: eps(i·1 eV) = %.3f, static kind %v\n", m.Name(), m.Epsilon(xi), material.KindOf(m))
	// Output: drude(9 eV, damping 0.035 eV): eps(i·1 eV) = 79.261, static kind drude
}
