"""Writes the UNIFAC parameter tables shipped with traystack (run once; the output is committed).

    python scripts/make_unifac_tables.py

Provenance. The numbers are the published tables of the two methods as copied into the
open-source registry package ``thermo`` (Caleb Bell, Chemical Engineering Design Library),
version 0.6.1, module ``thermo.unifac``:

- original UNIFAC: subgroups ``UFSG`` and main groups ``UFMG`` (copied there from the UNIFAC
  Consortium's public list of published parameters, ddbst.com "published-parameters-unifac"),
  interaction parameters ``UFIP`` (file "UNIFAC original interaction parameters.tsv", the same
  public list). The tables are those of Hansen, Rasmussen, Fredenslund, Schiller & Gmehling,
  Ind. Eng. Chem. Res. 30 (1991) 2352-2355 (main groups 1-50), with the revision and extension
  of Wittig, Lohmann & Gmehling, Ind. Eng. Chem. Res. 42 (2003) 183-188, and the groups the
  consortium published later (sulfones, imidazolium and bis(trifluoromethylsulfonyl)imide).
- modified UNIFAC (Dortmund): subgroups ``DOUFSG`` and main groups ``DOUFMG`` (copied there
  from the consortium's public list, ddbst.com "PublishedParametersUNIFACDO"), interaction
  parameters ``DOUFIP2016`` (the public list as of 2016): Weidlich & Gmehling, Ind. Eng. Chem.
  Res. 26 (1987) 1372-1381; Gmehling, Li & Schiller, Ind. Eng. Chem. Res. 32 (1993) 178-193;
  Gmehling, Lohmann, Jakob, Li & Joh, Ind. Eng. Chem. Res. 37 (1998) 4876-4882; Gmehling,
  Wittig, Lohmann & Joh, Ind. Eng. Chem. Res. 41 (2002) 1678-1688; Jakob, Grensemann, Lohmann &
  Gmehling, Ind. Eng. Chem. Res. 45 (2006) 7924-7933; Hector & Gmehling, Fluid Phase Equilib.
  371 (2014) 82-92 (ionic-liquid groups); Constantinescu & Gmehling, J. Chem. Eng. Data 61
  (2016) 2738-2748.

These are the consortium's published (public) tables, not a simulator's data bank. Interaction
parameters whose main group has no subgroup in the published list (Dortmund main groups 50 and
77) are left out, as they cannot be used. Subgroup 20 (the aldehyde group, main group 10) is
spelled "HCO" as in the consortium's list; ``thermo`` spells it "CHO", which is also the name of
the ether subgroup 26, and our names must be unique. The traystack runtime never imports
``thermo``; only this script does.
"""

from __future__ import annotations

import json
from pathlib import Path

import thermo
from thermo import unifac

OUT = Path(__file__).resolve().parent.parent / "solver" / "thermo" / "data"

RENAMED = {20: "HCO"}

COMMON_SOURCE = (
    f"copied by scripts/make_unifac_tables.py from the registry package thermo {thermo.__version__} "
    "(module thermo.unifac), which copies the UNIFAC Consortium's public list of published parameters"
)

VARIANTS = {
    "original": {
        "title": "UNIFAC, original method (vapor-liquid equilibrium parameters)",
        "model_source": "A. Fredenslund, R. L. Jones and J. M. Prausnitz, AIChE J. 21 (1975) 1086-1099",
        "interaction_form": "Psi_mn = exp(-a_mn / T), a_mn in K",
        "interaction_columns": ["main group m", "main group n", "a_mn / K"],
        "subgroup_table": "UFSG",
        "main_group_table": "UFMG",
        "interaction_table": "UFIP",
        "sources": {
            "subgroups": [
                "H. K. Hansen, P. Rasmussen, Aa. Fredenslund, M. Schiller and J. Gmehling, Ind. Eng. Chem. Res. 30 (1991) 2352-2355, Table 1",
                "R. Wittig, J. Lohmann and J. Gmehling, Ind. Eng. Chem. Res. 42 (2003) 183-188 (revision and extension)",
                "later groups of the UNIFAC Consortium's public list (sulfones; imidazolium and BTI ionic-liquid groups)",
            ],
            "interactions": [
                "H. K. Hansen et al., Ind. Eng. Chem. Res. 30 (1991) 2352-2355, Table 2",
                "R. Wittig, J. Lohmann and J. Gmehling, Ind. Eng. Chem. Res. 42 (2003) 183-188",
                "later parameters of the UNIFAC Consortium's public list",
            ],
        },
    },
    "dortmund": {
        "title": "modified UNIFAC (Dortmund)",
        "model_source": "U. Weidlich and J. Gmehling, Ind. Eng. Chem. Res. 26 (1987) 1372-1381",
        "interaction_form": "Psi_mn = exp(-(a_mn + b_mn T + c_mn T^2) / T), a in K, b dimensionless, c in 1/K",
        "interaction_columns": ["main group m", "main group n", "a_mn / K", "b_mn", "c_mn / (1/K)"],
        "subgroup_table": "DOUFSG",
        "main_group_table": "DOUFMG",
        "interaction_table": "DOUFIP2016",
        "sources": {
            "subgroups": [
                "U. Weidlich and J. Gmehling, Ind. Eng. Chem. Res. 26 (1987) 1372-1381",
                "J. Gmehling, J. Li and M. Schiller, Ind. Eng. Chem. Res. 32 (1993) 178-193",
                "J. Gmehling, J. Lohmann, A. Jakob, J. Li and R. Joh, Ind. Eng. Chem. Res. 37 (1998) 4876-4882",
                "J. Gmehling, R. Wittig, J. Lohmann and R. Joh, Ind. Eng. Chem. Res. 41 (2002) 1678-1688",
                "A. Jakob, H. Grensemann, J. Lohmann and J. Gmehling, Ind. Eng. Chem. Res. 45 (2006) 7924-7933",
                "T. Hector and J. Gmehling, Fluid Phase Equilib. 371 (2014) 82-92 (ionic-liquid groups)",
                "D. Constantinescu and J. Gmehling, J. Chem. Eng. Data 61 (2016) 2738-2748",
            ],
            "interactions": [
                "the same papers: the UNIFAC Consortium's public parameter list as of 2016",
            ],
        },
    },
}


def _rows(rows: list) -> str:
    return "[\n" + ",\n".join("    " + json.dumps(row) for row in rows) + "\n  ]"


def build(variant: str) -> str:
    spec = VARIANTS[variant]
    subgroup_table = getattr(unifac, spec["subgroup_table"])
    main_groups = getattr(unifac, spec["main_group_table"])
    interactions = getattr(unifac, spec["interaction_table"])
    subgroups = []
    for number in sorted(subgroup_table):
        group = subgroup_table[number]
        name = RENAMED.get(number, group.group)
        subgroups.append([number, name, group.main_group_id, float(group.R), float(group.Q)])
    names = [row[1] for row in subgroups]
    duplicates = sorted({name for name in names if names.count(name) > 1})
    if duplicates:
        raise SystemExit(f"{variant}: subgroup names not unique: {duplicates}")
    used_main_groups = {row[2] for row in subgroups}
    pairs = []
    for m in sorted(interactions):
        for n in sorted(interactions[m]):
            if m in used_main_groups and n in used_main_groups and m != n:
                value = interactions[m][n]
                pairs.append([m, n, float(value)] if variant == "original" else [m, n, *map(float, value)])
    header = {
        "variant": variant,
        "title": spec["title"],
        "model_source": spec["model_source"],
        "interaction_form": spec["interaction_form"],
        "subgroup_columns": ["number", "name", "main group", "R", "Q"],
        "interaction_columns": spec["interaction_columns"],
        "sources": spec["sources"],
        "copied_from": f"{COMMON_SOURCE}; tables {spec['subgroup_table']}, {spec['main_group_table']}, {spec['interaction_table']}",
        "main_groups": {str(k): main_groups[k][0] for k in sorted(main_groups) if k in used_main_groups},
    }
    text = json.dumps(header, indent=2)[:-2]
    text += ',\n  "subgroups": ' + _rows(subgroups)
    text += ',\n  "interactions": ' + _rows(pairs) + "\n}\n"
    json.loads(text)  # well formed
    return text


def main() -> None:
    OUT.mkdir(parents=True, exist_ok=True)
    for variant in VARIANTS:
        path = OUT / f"unifac_{variant}.json"
        path.write_text(build(variant))
        print(f"wrote {path}")


if __name__ == "__main__":
    main()
