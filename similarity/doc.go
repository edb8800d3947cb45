// Package similarity turns a full-scale flight condition into a scale-model test:
// dimensions and units, Buckingham Π groups, similarity parameters, the test article
// (geometry, aerodynamic estimate, skin friction), and the planner that chooses model
// scale and tunnel conditions.
package similarity
