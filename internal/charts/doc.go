// Package charts draws the service's engineering charts with gonum.org/v1/plot:
// the Reynolds-number envelope of a facility (with a plan's flight point, test
// point and trade curve), the balance utilisation over the angle-of-attack sweep,
// and the Reynolds trade of a chosen model. Each chart is a pure function of an
// answer the service already gives (a plan, a load check, a facility's envelope);
// this package computes nothing of its own beyond picking what to draw. One
// drawing is written as SVG, PNG or PDF (Render).
//
// Every chart has a title saying what it shows, axis labels with units, a legend
// beside the plot area (never over the data) when it draws more than one series,
// and a footer saying it is an estimate and what it leaves out.
//
// # Palette
//
// The series colours run along a blue–orange axis (navy, orange, sky blue, brown,
// grey, rose, slate, black): blue against orange stays apart for the common
// red–green colour-vision deficiencies, and no two neighbouring series share a
// lightness, so they stay apart in greyscale as well. Colour is never the only
// cue: every series also has its own dash pattern and marker shape, so a chart
// printed in black and white on a office printer still reads. The reachable region
// of an envelope is a pale blue-grey fill that prints as a light grey; the flight
// point is a solid black disc and the planned test point a hollow ring, shapes
// that need no colour at all; loads above the allowed line carry a heavy black
// cross inside a ring. Text and axes are near-black on white.
package charts
