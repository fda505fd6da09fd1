"""``selector grades``: the catalogue, or one grade."""
from __future__ import annotations

import json

NAME = "grades"


def run(args) -> int:
    from ... import catalogue, grade

    if args.name:
        g = grade(args.name)
        info = {"id": g.id, "name": g.name, "family": g.family, "designations": dict(g.designations),
                "aliases": list(g.aliases), "standard": g.standard, "routes": list(g.routes),
                "composition": {e: [g.comp_min[e], g.comp_max[e]] for e in g.comp_min},
                "relative_price": g.relative_price, "source": g.source, "confidence": g.confidence}
        print(json.dumps(info, indent=2, ensure_ascii=False) if args.json else
              "\n".join(f"{k:>15}: {v}" for k, v in info.items()))
        return 0
    cat = catalogue()
    cols = ["grade", "family", "designations", "routes", "relative_price", "confidence"]
    if args.json:
        print(cat[cols + ["source"]].to_json(orient="records", indent=2, force_ascii=False))
    else:
        print(cat[cols].to_string(index=False))
    return 0


def add_command(sub) -> None:
    gr = sub.add_parser(NAME, help="list the catalogue, or show one grade")
    gr.add_argument("name", nargs="?")
    gr.add_argument("--json", action="store_true")
    gr.set_defaults(func=run)
