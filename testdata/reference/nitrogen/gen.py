#!/usr/bin/python3
"""Generate the nitrogen reference fixture for the Go package scalematch/facilities.

No Debian package offers nitrogen's properties (python3-fluids has no real-gas
nitrogen), so this script states the reference equation of state of nitrogen,
Span, Lemmon, Jacobsen, Wagner & Yokozeki (2000, J. Phys. Chem. Ref. Data 29:1361),
and the viscosity correlation of Lemmon & Jacobsen (2004, Int. J. Thermophys.
25:21, dilute-gas and residual terms; no critical enhancement, which matters only
near the critical point) in the multiparameter framework of python3-iapws (Debian
package; run with /usr/bin/python3): iapws.iapws95.MEoS evaluates the Helmholtz
energy, solves for the density and gives the speed of sound, exactly as it does
for its own fluids.

The coefficients are checked before anything is written (check_published): the
equation must give the published states below within their printed digits, so a
mistyped coefficient stops the script.

  Span et al. (2000), tables of the paper (single-phase states):
    80 K, 0.1 MPa:    density 0.15633 mol/dm3, speed of sound 178.3 m/s
    1000 K, 2 MPa:    density 0.23889 mol/dm3, speed of sound 635.5 m/s
    100 K, 5 MPa:     density 25.436 mol/dm3,  speed of sound 673.2 m/s
    350 K, 20 MPa:    density 6.3552 mol/dm3,  speed of sound 449.7 m/s
  Lemmon & Jacobsen (2004), table of check values for nitrogen (viscosity at a
  given molar density):
    100 K, 0:           6.90349 uPa s      300 K, 0:    17.8771 uPa s
    100 K, 25 mol/dm3: 79.7418 uPa s       200 K, 10:   21.0810 uPa s
    300 K, 5 mol/dm3:  20.7430 uPa s

nitrogen.csv: gas-phase nitrogen every 10 K from 100 K to 300 K at 0.1, 0.2, 0.3,
0.4 and 0.45 MPa (all above the saturation temperature, 91 K at 0.45 MPa):

  Nitrogen(T=T, P=p, rho0=ideal).rho (kg/m3)  -> density_kg_m3
  Nitrogen(T=T, P=p, rho0=ideal).w   (m/s)    -> speed_of_sound_m_s
  Nitrogen(T=T, P=p, rho0=ideal).mu  (Pa s)   -> viscosity_Pa_s

  /usr/bin/python3 gen.py          rewrite the file next to this script
  /usr/bin/python3 gen.py --check  regenerate into a temporary directory and compare;
                                   exit 1 when a number differs by more than 1e-10
                                   relative or the rows differ
"""
import os
import platform
import sys
from math import exp, log

import iapws
from iapws.iapws95 import MEoS

HERE = os.path.dirname(os.path.abspath(__file__))
sys.path.insert(0, os.path.dirname(HERE))
import fixturecheck  # noqa: E402  (testdata/reference/fixturecheck.py)
REL_TOL = 1e-10
TEMPERATURES = range(100, 301, 10)
PRESSURES = (0.1, 0.2, 0.3, 0.4, 0.45)  # MPa
MOLAR_MASS = 28.01348  # g/mol (Span et al. 2000)


class Nitrogen(MEoS):
    """Span et al. (2000) for nitrogen, with the viscosity of Lemmon & Jacobsen (2004)."""
    name = "nitrogen"
    CASNumber = "7727-37-9"
    formula = "N2"
    synonym = "R-728"
    rhoc = 11.1839 * MOLAR_MASS  # kg/m3
    Tc = 126.192  # K
    Pc = 3.3958  # MPa
    M = MOLAR_MASS
    Tt = 63.151
    Tb = 77.355
    f_acent = 0.0372
    momentoDipolar = 0.0

    # Ideal-gas part: ln(delta) + 2.5 ln(tau) + a2 + a3 tau + a4/tau + a5/tau^2
    # + a6/tau^3 + a7 ln(1 - exp(-a8 tau)).
    Fi0 = {"ao_log": [1, 2.5],
           "pow": [0, 1, -1, -2, -3],
           "ao_pow": [-12.76952708, -0.00784163, -1.934819e-4, -1.247742e-5, 6.678326e-8],
           "ao_exp": [1.012941],
           "titao": [26.65788]}

    _constants = {
        "R": 8.31451,
        "Tref": 126.192, "rhoref": 11.1839 * MOLAR_MASS,
        "nr1": [0.924803575275, -0.492448489428, 0.661883336938,
                -0.192902649201e1, -0.622469309629e-1, 0.349943957581],
        "d1": [1, 1, 2, 2, 3, 3],
        "t1": [0.25, 0.875, 0.5, 0.875, 0.375, 0.75],
        "nr2": [0.564857472498, -0.161720005987e1, -0.481395031883,
                0.421150636384, -0.161962230825e-1, 0.172100994165,
                0.735448924933e-2, 0.168077305479e-1, -0.107626664179e-2,
                -0.137318088513e-1, 0.635466899859e-3, 0.304432279419e-2,
                -0.435762336045e-1, -0.723174889316e-1, 0.389644315272e-1,
                -0.212201363910e-1, 0.408822981509e-2, -0.551990017984e-4,
                -0.462016716479e-1, -0.300311716011e-2, 0.368825891208e-1,
                -0.255856846220e-2, 0.896915264558e-2, -0.441513370350e-2,
                0.133722924858e-2, 0.264832491957e-3],
        "d2": [1, 1, 1, 3, 3, 4, 6, 6, 7, 7, 8, 8, 1, 2, 3, 4, 5, 8, 4, 5, 5,
               8, 3, 5, 6, 9],
        "t2": [0.5, 0.75, 2., 1.25, 3.5, 1., 0.5, 3., 0., 2.75, 0.75, 2.5, 4.,
               6., 6., 3., 3., 6., 16., 11., 15., 12., 12., 7., 4., 16.],
        "c2": [1, 1, 1, 1, 1, 1, 1, 1, 1, 1, 1, 1, 2, 2, 2, 2, 2, 2, 3, 3, 3,
               3, 4, 4, 4, 4],
        "gamma2": [1] * 26,
        "nr3": [0.196688194015e2, -0.209115600730e2, 0.167788306989e-1,
                0.262767566274e4],
        "d3": [1, 1, 3, 2],
        "t3": [0., 1., 2., 3.],
        "alfa3": [20, 20, 15, 25],
        "beta3": [325, 325, 300, 275],
        "gamma3": [1.16, 1.16, 1.13, 1.25],
        "epsilon3": [1] * 4}

    # Ancillary equations of Span et al. (2000) for the saturation line: they only
    # start the density solver and tell liquid from vapour, never a tabulated value.
    _Pv = {"ao": [-6.12445284, 1.26327220, -0.765910082, -1.77570564],
           "exp": [1, 1.5, 2.5, 5]}
    _rhoL = {"eq": 1, "ao": [1.48654237, -0.280476066, 0.0894143085, -0.119879866],
             "exp": [0.3294, 2 / 3, 8 / 3, 35 / 6]}
    _rhoG = {"eq": 3, "ao": [-1.70127164, -3.70402649, 1.29859383, -0.561424977, -2.68505381],
             "exp": [0.34, 5 / 6, 7 / 6, 13 / 6, 14 / 3]}

    @staticmethod
    def _visco(rho, T, fase=None):
        """Lemmon & Jacobsen (2004) viscosity of nitrogen in Pa s at rho in kg/m3, T in K."""
        tstar = log(T / 98.94)
        omega = exp(sum(b * tstar ** i for i, b in enumerate((0.431, -0.4623, 0.08406, 0.005341, -0.00331))))
        mu0 = 0.0266958 * (MOLAR_MASS * T) ** 0.5 / (0.3656 ** 2 * omega)
        tau, delta = 126.192 / T, rho / (11.1839 * MOLAR_MASS)
        mur = 0
        for n, t, d, l in ((10.72, 0.1, 2, 0), (0.03989, 0.25, 10, 1), (0.001208, 3.2, 12, 1),
                           (-7.402, 0.9, 2, 2), (4.620, 0.3, 1, 3)):
            mur += n * tau ** t * delta ** d * (exp(-delta ** l) if l else 1)
        return (mu0 + mur) * 1e-6

    def _thermo(self, rho, T, fase=None):
        """Thermal conductivity is not part of the fixture: NaN (iapws fills it in)."""
        return float("nan")

    def _surface(self, T):
        """Surface tension is not part of the fixture: NaN (iapws fills it in)."""
        return float("nan")


def ideal(T, p):
    """Ideal-gas density of nitrogen in kg/m3 at T in K and p in MPa."""
    return p * 1e3 * MOLAR_MASS / (8.31451 * T)


def state(T, p):
    return Nitrogen(T=T, P=p, rho0=ideal(T, p))


def check_published():
    for T, p, rho_m, w in ((80, 0.1, 0.15633, 178.3), (1000, 2.0, 0.23889, 635.5),
                           (100, 5.0, 25.436, 673.2), (350, 20.0, 6.3552, 449.7)):
        rho0 = ideal(T, p) if rho_m < 1 else rho_m * MOLAR_MASS
        st = Nitrogen(T=T, P=p, rho0=rho0)
        digits = len(("%g" % rho_m).split(".")[1])
        if round(st.rho / MOLAR_MASS, digits) != rho_m or round(st.w, 1) != w:
            raise SystemExit("Span et al. (2000) check failed at %g K, %g MPa: %.6g mol/dm3, %.5g m/s"
                             % (T, p, st.rho / MOLAR_MASS, st.w))
    for T, rho_m, mu in ((100, 0, "6.90349"), (300, 0, "17.8771"), (100, 25, "79.7418"),
                         (200, 10, "21.0810"), (300, 5, "20.7430")):
        got = Nitrogen._visco(rho_m * MOLAR_MASS, T) * 1e6
        if round(got, len(mu.split(".")[1])) != float(mu):
            raise SystemExit("Lemmon & Jacobsen (2004) check failed at %g K, %g mol/dm3: %.6f uPa s" % (T, rho_m, got))


def rows():
    out = [
        "# nitrogen: Span et al. (2000) equation of state, Lemmon & Jacobsen (2004) viscosity",
        "# generated by testdata/reference/nitrogen/gen.py with Nitrogen(T=T, P=p, rho0=ideal).rho, .w, .mu",
        "# iapws %s (Debian python3-iapws %s), Python %s"
        % (iapws.__version__, fixturecheck.debian_version("python3-iapws"), platform.python_version()),
        "T_K,p_Pa,density_kg_m3,speed_of_sound_m_s,viscosity_Pa_s",
    ]
    for T in TEMPERATURES:
        for p in PRESSURES:
            st = state(T, p)
            out.append("%d,%.12g,%.12g,%.12g,%.12g" % (T, p * 1e6, st.rho, st.w, st.mu))
    return out


FILES = (("nitrogen.csv", rows),)



def write(directory):
    check_published()
    fixturecheck.write(directory, FILES)

if __name__ == "__main__":
    sys.exit(fixturecheck.main(sys.argv, __doc__, HERE, FILES, REL_TOL, write))
