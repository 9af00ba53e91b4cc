package main

// Temporary: keeps the chosen dependencies in go.mod until the packages that use them land.
import (
	_ "github.com/go-git/go-git/v5"
	_ "github.com/yuin/goldmark"
	_ "go.yaml.in/yaml/v3"
	_ "gonum.org/v1/gonum/dsp/fourier"
	_ "gonum.org/v1/gonum/interp"
	_ "gonum.org/v1/gonum/mat"
	_ "gonum.org/v1/gonum/optimize"
	_ "gonum.org/v1/gonum/stat"
	_ "gonum.org/v1/plot"
)
