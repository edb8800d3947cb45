package facilities

// Coefficients are the aerodynamic coefficients of one test-matrix point, based on
// the model's reference area S and reference length c. Lift C_L and drag C_D are in
// wind axes (their plane is the model's plane of symmetry); the pitching moment C_m
// is about the moment reference centre, positive nose-up; side force C_Y (positive
// to starboard), rolling moment C_l (positive starboard wing down) and yawing moment
// C_n (positive nose to starboard) are in body axes. Zero values are zero loads.
type Coefficients struct {
	CL float64 `json:"cl"`
	CD float64 `json:"cd"`
	Cm float64 `json:"cm"`
	CY float64 `json:"cy"`
	Cl float64 `json:"cl_roll"`
	Cn float64 `json:"cn"`
}

// Point is one point of the test matrix: its angles of attack and sideslip in
// degrees (geometric, in the test section), its coefficients, and the wall
// correction's q_c/q at this point (0 means 1: no correction).
type Point struct {
	Alpha float64 `json:"alpha"`
	Beta  float64 `json:"beta"`
	Coefficients
	DynamicPressureFactor float64 `json:"dynamic_pressure_factor"`
}
