"""The issue's 'done when', as one notebook session would run it: assess, HTML summary, a DataFrame of a batch screen,
the uncertainty samples and Sobol' indices, a matplotlib figure, and model warnings shown by Python itself.

Inputs: the invented demo scenario and the invented example batch tables shipped with the package.
"""

from __future__ import annotations

import warnings
from pathlib import Path

import pandas as pd
from conftest import base_dict
from matplotlib.figure import Figure

import interact
from interact.batch import evaluate_pairs, loads_perpetrators, loads_victims
from interact.report import figures
from interact.scenario import scenario_from_dict
from interact.uncertainty import run_uncertainty, sensitivity

EXAMPLES = Path(interact.__file__).parent / "examples"


def test_a_notebook_session() -> None:
    a = interact.assess(interact.load_scenario(interact.demo_path()))
    html = a._repr_html_()
    assert html.startswith('<div class="interact-summary">') and "Caution" in html

    frame_p = pd.read_csv(EXAMPLES / "batch_perpetrators.csv", comment="#")
    frame_v = pd.read_csv(EXAMPLES / "batch_victims.csv", comment="#")
    screen = evaluate_pairs(loads_perpetrators(frame_p, source="frame"), loads_victims(frame_v, source="frame")).to_pandas()
    assert len(screen) == len(frame_p) * len(frame_v) and screen["auc_ratio"].dtype == "float64"

    vary = [("perpetrator.cmax", "cv:30%"), ("victim.fg", "uniform:0.3,0.6")]
    samples = run_uncertainty(a, vary, samples=2000).to_pandas()
    assert {"perpetrator.cmax", "victim.fg", "auc_ratio"} <= set(samples.columns)
    indices = sensitivity(a, vary).variance
    assert indices is not None and list(indices.to_pandas().columns) == [
        "input",
        "label",
        "first_order",
        "total_order",
        *(f"{kind}_{organ}" for organ in ("gut", "liver", "kidney") for kind in ("first_order", "total_order")),
    ]

    assert isinstance(figures.histogram_figure(run_uncertainty(a, vary, samples=500)), Figure)

    d = base_dict()
    del d["victim"]["fg"]
    with warnings.catch_warnings(record=True) as shown:
        warnings.simplefilter("default")  # a notebook's own filter: show each warning once
        interact.assess(scenario_from_dict(d))
    assert any(issubclass(w.category, interact.AssumptionWarning) for w in shown)
