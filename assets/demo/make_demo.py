#!/usr/bin/env python3
"""Writes the invented demo data sets in this folder. Run: python3 make_demo.py

The scenarios are fictional: the numbers come from a constant-ΔCp° van 't Hoff model
with chosen parameters plus seeded Gaussian noise, and one deliberately bad point in the
binding set. Nothing here is a real measurement.
"""
import math
import random

R = 8.314462618  # J/(mol K), CODATA 2018


def ln_k(t, dh, ds, dcp, theta=298.15):
    return -dh / (R * t) + ds / R + dcp * (theta / t - 1 + math.log(t / theta)) / R


def binding():
    # Fictional ligand "QX-7" binding the fictional receptor "Halo-2" (isothermal
    # titrations at ten temperatures). ΔH°(25 °C) = −45 kJ/mol, ΔS° = −20 J/(mol K),
    # ΔCp° = −900 J/(mol K). Dissociation constants in nM with unequal standard deviations.
    rng = random.Random(7)
    rows = []
    temps_c = [10.0, 13.5, 17.0, 20.0, 23.5, 27.0, 30.0, 33.5, 37.0, 40.0]
    for i, tc in enumerate(temps_c):
        t = tc + 273.15
        sigma = 0.05 + 0.01 * (i % 4)  # σ(ln K)
        lk = ln_k(t, -45e3, -20.0, -900.0) + rng.gauss(0.0, sigma)
        note = ""
        if tc == 30.0:
            lk -= 0.55  # a bubble in the cell: the point a chemist should question
            note = "baseline drift during titration"
        kd_nm = math.exp(-lk) * 1e9
        rows.append((tc, kd_nm, kd_nm * sigma, note))
    with open("binding_qx7_halo2.csv", "w", encoding="utf-8") as f:
        f.write("# Fictional demo: ligand QX-7 binding receptor Halo-2 (invented numbers)\n")
        f.write("T (°C),Kd (nM),sd_Kd (nM),note\n")
        for tc, kd, sd, note in rows:
            f.write(f"{tc:.1f},{kd:.2f},{sd:.2f},{note}\n")


def acid():
    # Fictional "quillonic acid" (invented) first dissociation constant by potentiometry
    # from 5 to 60 °C. ΔH°(25 °C) = 28 kJ/mol, ΔS° = −45 J/(mol K), ΔCp° = −160 J/(mol K).
    rng = random.Random(11)
    with open("acid_pka.csv", "w", encoding="utf-8") as f:
        f.write("# Fictional demo: pKa of the invented acid 'quillonic acid' (not a real compound)\n")
        f.write("temp/K,pKa,u(pKa)\n")
        for i in range(12):
            t = 278.15 + 5.0 * i
            u = 0.008 + 0.004 * (i % 3)
            pka = -ln_k(t, 28e3, -45.0, -160.0) / math.log(10) + rng.gauss(0.0, u)
            f.write(f"{t:.2f},{pka:.4f},{u:.3f}\n")


if __name__ == "__main__":
    binding()
    acid()
