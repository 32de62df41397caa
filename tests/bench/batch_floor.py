"""The floor for ``screen-batch`` (run by tests/bench/bench_batch.py, not a test): a plain numpy script.

    python tests/bench/batch_floor.py PERPETRATORS.csv VICTIMS.csv OUT.csv CONSTANTS_JSON

It reads the bench's two CSV tables with numpy (``genfromtxt``; units fixed by the bench's headers, no
validation), evaluates the same equations as interact (unbound Cmax, hepatic inlet, enterocyte and gut-lumen
concentrations; Ki,u = Ki x fu,inc; the basic R1 values; the mechanistic static model's gut, liver and total AUC
ratios), a class band, the study verdict, a plain dose action (reduce / increase / no change by the no-effect
boundary) and the same flag bits, ranks every pair worst first (largest |log AUCR|) and writes the same 18
columns with the same writer (pyarrow's CSV writer, or its Parquet writer for an OUT ending in .parquet, in blocks of 65,536
rows) to an ordinary file (no atomic
replace, no fsync).  It does not import interact: the constants (physiology defaults, fu,p floor, cutoffs, class
bounds) come from the bench as JSON, so both sides use the same values.
"""

from __future__ import annotations

import json
import sys

import numpy as np
import pyarrow as pa
import pyarrow.csv as pa_csv
import pyarrow.parquet as pq

ENZYMES = ("CYP3A", "CYP2C9", "CYP2D6")


def main(p_path: str, v_path: str, out_path: str, constants: str) -> None:
    c = json.loads(constants)
    # perpetrators: name, dose (mg), molar mass (g/mol), cmax (ng/mL), fu_p, ka (1/min), ki x3 (uM), fu_inc x3
    p_names = np.genfromtxt(p_path, delimiter=",", skip_header=1, usecols=0, dtype=str, comments=None)
    p = np.genfromtxt(p_path, delimiter=",", skip_header=1, usecols=range(1, 12), filling_values=np.nan, comments=None, ndmin=2)
    dose, mw, cmax_ng, fu_given, ka = p[:, 0], p[:, 1], p[:, 2], p[:, 3], p[:, 4]
    ki = p[:, 5:8]
    fu_inc = np.where(np.isnan(p[:, 8:11]), 1.0, p[:, 8:11])
    dose_umol = dose * 1000.0 / mw
    cmax = cmax_ng / mw
    fu = np.maximum(fu_given, c["fu_floor"])
    imax_u = cmax * fu
    inlet = fu * (cmax + c["fa_fg"] * ka * dose_umol / (c["qh"] * c["rb"]))
    ent = c["fu_gut"] * (c["fa"] * ka * dose_umol) / c["qent"]
    igut = dose_umol / c["gut_volume"]
    ki_u = ki * fu_inc
    r1 = 1.0 + imax_u[:, None] / ki_u
    r1_gut = 1.0 + igut / ki_u[:, 0]
    basic = []
    for i in range(len(p_names)):
        parts = [
            f"R1 {e} {r1[i, k]:.4g}{' STUDY' if r1[i, k] >= c['r1_cutoff'] else ''}"
            for k, e in enumerate(ENZYMES)
            if ki_u[i, k] == ki_u[i, k]
        ]
        if ki_u[i, 0] == ki_u[i, 0]:
            parts.append(f"R1,gut CYP3A {r1_gut[i]:.4g}{' STUDY' if r1_gut[i] >= c['r1_gut_cutoff'] else ''}")
        basic.append("; ".join(parts))
    basic_flag = np.array(["STUDY" in b for b in basic])
    # victims: name, dose (mg), interval (h), fg, strengths (mg), fm x3
    v_names = np.genfromtxt(v_path, delimiter=",", skip_header=1, usecols=0, dtype=str, comments=None)
    v = np.genfromtxt(v_path, delimiter=",", skip_header=1, usecols=(3, 5, 6, 7), filling_values=np.nan, comments=None, ndmin=2)
    fg, fm = v[:, 0], np.nan_to_num(v[:, 1:4])
    # every pair (perpetrators x victims)
    act = 1.0 / (1.0 + inlet[:, None] / np.where(np.isnan(ki_u), np.inf, ki_u))
    act_g = 1.0 / (1.0 + ent / np.where(np.isnan(ki_u[:, 0]), np.inf, ki_u[:, 0]))
    liver = 1.0 / (act @ fm.T + (1.0 - fm.sum(1))[None, :])
    gut = 1.0 / (act_g[:, None] * (1.0 - fg[None, :]) + fg[None, :])
    gut[np.isnan(ki_u[:, 0])] = 1.0
    total = gut * liver
    r = total.ravel()
    tests = [r >= b for b in c["inhibition"]] + [r <= b for b in c["induction"]]
    band = np.select(tests, list(range(1, len(tests) + 1)), default=0).astype(np.int8)
    study = (total >= c["aucr_inhibition"]) | (total <= c["aucr_induction"])
    action = np.where(total >= c["no_effect_upper"], 1, np.where(total <= c["no_effect_lower"], 2, 0))
    not_inhibited = ((fm[None, :, :] > 0) & np.isnan(ki_u)[:, None, :]).any(-1)
    flags = (fu_given < c["fu_floor"])[:, None].astype(np.uint8) << 1 | not_inhibited.astype(np.uint8) << 3
    flags |= basic_flag[:, None].astype(np.uint8) << 4
    order = np.argsort(-np.abs(np.log(total.ravel())), kind="stable")
    # the same 18 columns (its victims have no secretion routes: a kidney ratio of 1), the same writer
    names = ["rank", "perpetrator", "victim", "Imax,u (uM)", "Iin,max,u (uM)", "Igut (uM)", "I,ent (uM)", "basic models", "AUCR gut"]
    names += ["AUCR liver", "AUCR kidney", "AUCR"]
    names += ["phenotype", "exposure vs normal", "class", "study indicated (mechanistic model)", "action", "flags"]
    p_text, v_text, basic_text = pa.array(p_names.tolist()), pa.array(v_names.tolist()), pa.array(basic)
    band_text = pa.array(c["band_names"])
    action_text = pa.array(["no change", "reduce dose", "increase dose"])
    flag_text = pa.array([c["flag_texts"][k] for k in range(32)])
    yes_no = pa.array(["no", "yes"])
    no_phenotype = pa.array([""])
    n_v = len(v_names)
    parquet = out_path.endswith(".parquet")
    writer = None
    with open(out_path, "wb") as out:
        if not parquet:
            out.write((",".join(f'"{n}"' if "," in n else n for n in names) + "\n").encode())
        for start in range(0, order.size, 65_536):
            idx = order[start : start + 65_536]
            ii, jj = np.divmod(idx, n_v)
            cols = [
                pa.array(np.arange(start + 1, start + 1 + idx.size)),
                p_text.take(ii),
                v_text.take(jj),
                pa.array(imax_u[ii]),
                pa.array(inlet[ii]),
                pa.array(igut[ii]),
                pa.array(ent[ii]),
                basic_text.take(ii),
                pa.array(gut.ravel()[idx]),
                pa.array(liver.ravel()[idx]),
                pa.array(np.ones(idx.size)),
                pa.array(total.ravel()[idx]),
                no_phenotype.take(np.zeros(idx.size, dtype=np.int8)),
                pa.array(total.ravel()[idx]),
                band_text.take(band[idx]),
                pa.array(study.ravel()[idx]) if parquet else yes_no.take(study.ravel()[idx].astype(np.int8)),
                action_text.take(action.ravel()[idx]),
                flag_text.take(flags.ravel()[idx]),
            ]
            batch = pa.RecordBatch.from_arrays(cols, names=names)
            if parquet:
                writer = writer or pq.ParquetWriter(out, batch.schema)
                writer.write_batch(batch)
            else:
                pa_csv.write_csv(batch, out, pa_csv.WriteOptions(include_header=False))
        if writer is not None:
            writer.close()


if __name__ == "__main__":
    main(*sys.argv[1:5])
