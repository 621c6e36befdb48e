"""pKw of liquid water at 0.1 MPa from 0 to 60 °C, from the IAPWS R11-07(2019) formulation
for the ionization constant of water (Bandura & Lvov), as implemented by the PyPI package
`iapws`, with the density of liquid water at 0.1 MPa from the IAPWS-95 formulation in the
same package.

At 0 °C and 0.1 MPa water is liquid to within a few millikelvin of its melting point; the
formulation is valid from 273.15 K.

Run:  python3 make_pkw.py > pkw_iapws.txt
"""

import sys

import iapws
from iapws import IAPWS95
from iapws._iapws import _Kw

PRESSURE_MPA = 0.1


def main():
    out = sys.stdout
    out.write("# pKw of liquid water at 0.1 MPa: IAPWS R11-07(2019) via the PyPI package "
              f"iapws {iapws.__version__} (python {sys.version.split()[0]})\n")
    out.write("# density from IAPWS-95 in the same package\n")
    out.write("# columns: t_celsius  density_kg_per_m3  pKw (17 significant digits)\n")
    for t_c in range(0, 61, 5):
        t_k = 273.15 + t_c
        rho = IAPWS95(T=t_k, P=PRESSURE_MPA).rho
        pkw = _Kw(rho, t_k)
        out.write(f"{t_c} {format(rho, '.17g')} {format(pkw, '.17g')}\n")


if __name__ == "__main__":
    main()
