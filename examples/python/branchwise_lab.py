#!/usr/bin/env python3
"""A lab script talking to branchwise with plain `requests`.

It fits a line list, checks a CSV export, posts a JCAMP-DX peak table, streams a batch of archived scans and saves
the HTML report of one of them. The scans are the invented "Fernhollow" demo sets in examples/ (generated from
published constants; not measurements).

    python3 examples/python/branchwise_lab.py --base-url http://127.0.0.1:8080 --out-dir /tmp/branchwise-demo

Set BRANCHWISE_API_KEY when the service is started with API keys. Every result line printed is JSON, so that other
scripts can read this one's output too. branchwise computes constants from data; it certifies nothing about the
safety or purity of a gas.
"""
import argparse
import json
import os
import pathlib
import sys

import requests

HERE = pathlib.Path(__file__).resolve().parent
EXAMPLES = HERE.parent


def session():
    s = requests.Session()
    key = os.environ.get("BRANCHWISE_API_KEY")
    if key:
        s.headers["Authorization"] = f"Bearer {key}"
    return s


def refused(r):
    """A 4xx/5xx answer is RFC 9457 problem details: show its code and detail, not a traceback."""
    try:
        p = r.json()
        return f"{r.status_code} {p.get('code')}: {p.get('detail')}"
    except ValueError:
        return f"{r.status_code}: {r.text[:200]}"


def show(step, **fields):
    print(json.dumps({"step": step, **fields}))


def main():
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--base-url", default="http://127.0.0.1:8080")
    ap.add_argument("--out-dir", default=".")
    args = ap.parse_args()
    base = args.base_url.rstrip("/")
    out_dir = pathlib.Path(args.out_dir)
    out_dir.mkdir(parents=True, exist_ok=True)
    s = session()

    co = json.loads((EXAMPLES / "fernhollow-co-cylinder-0192.json").read_text())
    hcl = json.loads((EXAMPLES / "fernhollow-hcl-cylinder-7741.json").read_text())

    # 1. Fit a line list (JSON).
    r = s.post(f"{base}/v1/fits", json=co, timeout=60)
    if not r.ok:
        sys.exit(f"fit refused: {refused(r)}")
    fit = r.json()
    origin = fit["bands"][0]["origin"]
    show("fit", species=fit["species"][0]["formula"], band=fit["bands"][0]["band"],
         origin=origin["value"], uncertainty=origin["uncertainty"], rms=fit["statistics"]["rms"])

    # 2. Check a CSV export: columns by name, ";" separators and decimal commas, as a spreadsheet writes them.
    rows = ["Position;Unc.;Band;Branch;J", "cm-1;cm-1;;;"]
    for line in hcl["lines"]:
        a = line["assignment"]
        rows.append(f"{str(line['position']).replace('.', ',')};{str(line['uncertainty']).replace('.', ',')};"
                    f"{a['band']};{a['branch']};{a['j']}")
    r = s.post(f"{base}/v1/checks", params={"species": "H35Cl"}, data="\n".join(rows).encode(),
               headers={"Content-Type": "text/csv"}, timeout=60)
    if not r.ok:
        sys.exit(f"check refused: {refused(r)}")
    check = r.json()
    show("check-csv", verdict=check["verdict"], checks={c["id"]: c["status"] for c in check["checks"]})

    # 3. Post a JCAMP-DX peak table ("x y" pairs), species in the query string.
    jdx = "\n".join(
        ["##TITLE=Fernhollow CO cylinder 0192 (invented demo)", "##JCAMP-DX=4.24", "##DATA TYPE=INFRARED PEAK TABLE",
         "##XUNITS=1/CM", "##YUNITS=ABSORBANCE", "##PEAK TABLE=(XY..XY)"]
        + [f"{line['position']} 0.5" for line in co["lines"]]
        + ["##END="]) + "\n"
    r = s.post(f"{base}/v1/fits", params={"species": "CO"}, data=jdx.encode(),
               headers={"Content-Type": "chemical/x-jcamp-dx"}, timeout=60)
    if not r.ok:
        sys.exit(f"JCAMP-DX fit refused: {refused(r)}")
    jfit = r.json()
    show("fit-jcamp", lines=jfit["statistics"]["lines"], fitted=jfit["statistics"]["fitted"],
         origin=jfit["bands"][0]["origin"]["value"])

    # 4. Stream a batch: one request a line in, one result a line out, read as they arrive.
    archive = [co, hcl, {"species": "CO", "lines": []}]
    body = "".join(json.dumps(x) + "\n" for x in archive).encode()
    with s.post(f"{base}/v1/batch/checks", data=body, headers={"Content-Type": "application/x-ndjson"},
                stream=True, timeout=120) as r:
        if not r.ok:
            sys.exit(f"batch refused: {refused(r)}")
        for raw in r.iter_lines():
            if not raw:
                continue
            item = json.loads(raw)
            show("batch", line=item["line"], status=item["status"],
                 verdict=item.get("result", {}).get("verdict"), problem=item.get("problem", {}).get("code"))

    # 5. Save the HTML report of the HCl scan.
    r = s.post(f"{base}/v1/reports", json=hcl, timeout=60)
    if not r.ok:
        sys.exit(f"report refused: {refused(r)}")
    path = out_dir / "fernhollow-hcl-cylinder-7741.html"
    path.write_bytes(r.content)
    show("report", path=str(path), bytes=len(r.content))


if __name__ == "__main__":
    main()
