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


def ligands():
    # Fictional ligand series: four invented ligands "PX-11" … "PX-14" binding the invented
    # protein "Orrin-3", each titrated at nine temperatures (the last ligand over a range
    # 2 °C higher). Every ligand has the same ΔCp° = −850 J/(mol K) (a shared ΔCp° fits),
    # and their ΔH° and ΔS° at 25 °C lie on a compensation line ΔH° = α + β ΔS° with
    # β = 340 K, away from the harmonic-mean temperature (about 299 K), so the
    # Krug–Hunter–Grieger test has something to find. Dissociation constants in nM with
    # standard deviations from σ(ln K) of 0.04–0.07, seeded Gaussian noise.
    rng = random.Random(23)
    beta, alpha = 340.0, -38.9e3
    ligands = [("PX-11", -62e3), ("PX-12", -50e3), ("PX-13", -38e3), ("PX-14", -27e3)]
    with open("ligands_px_orrin3.csv", "w", encoding="utf-8") as f:
        f.write("# Fictional demo: four invented ligands PX-11 to PX-14 binding the invented protein Orrin-3 (invented numbers, no real measurement)\n")
        f.write("sample,T (°C),Kd (nM),sd_Kd (nM)\n")
        for j, (name, dh) in enumerate(ligands):
            ds = (dh - alpha) / beta
            start = 12.0 if j == 3 else 10.0
            for i in range(9):
                tc = start + 4.0 * i
                t = tc + 273.15
                sigma = 0.04 + 0.01 * ((i + j) % 4)
                lk = ln_k(t, dh, ds, -850.0) + rng.gauss(0.0, sigma)
                kd_nm = math.exp(-lk) * 1e9
                f.write(f"{name},{tc:.1f},{kd_nm:.2f},{kd_nm * sigma:.2f}\n")
    # Invented calorimetric enthalpies of the same ligands (the README's example reads them
    # with --calorimetric-file): ΔH_cal at 25 °C of each ligand and at 37 °C for PX-11.
    # PX-13's was "measured" in a buffer whose protonation adds heat (7 kJ/mol more
    # exothermic), the case the caution about coupled equilibria is for.
    cal = [
        ("PX-11", 25.0, -62.4, 0.6),
        ("PX-11", 37.0, -72.3, 0.8),
        ("PX-12", 25.0, -51.8, 0.5),
        ("PX-13", 25.0, -45.1, 0.5),
        ("PX-14", 25.0, -27.5, 0.4),
    ]
    with open("ligands_px_orrin3_itc.csv", "w", encoding="utf-8") as f:
        f.write("# Fictional demo: invented calorimetric enthalpies of the PX ligands binding Orrin-3 (invented numbers, no real measurement)\n")
        f.write("sample,T (°C),dH_cal (kJ/mol),u (kJ/mol)\n")
        for name, tc, dh, u in cal:
            f.write(f"{name},{tc:.1f},{dh:.1f},{u:.1f}\n")


if __name__ == "__main__":
    binding()
    acid()
    ligands()
