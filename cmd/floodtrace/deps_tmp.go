package main

import (
	_ "github.com/fogleman/gg"
	_ "github.com/schollz/progressbar/v3"
	_ "github.com/spf13/pflag"
	_ "gonum.org/v1/gonum/dsp/fourier"
	_ "gonum.org/v1/gonum/interp"
	_ "gonum.org/v1/gonum/mat"
	_ "gonum.org/v1/plot"
	_ "gopkg.in/yaml.v3"
)

func main() {}
