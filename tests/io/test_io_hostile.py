"""Hostile file input: families of mutated plan files and tables.

Every case must end in a loaded plan or one InvalidInput, never another
exception, and within a time cap (a guard against hangs such as alias
expansion, not a timing assertion). Cases with a known right answer (a
billion-laughs file is refused; a sector named "NA" loads) also check it.
The counts per family and outcome are printed at the end of the run.
"""

from __future__ import annotations

import contextlib
import os
import signal
from collections import Counter
from collections.abc import Callable
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np
import pytest
import yaml

import growthplan as gp
from growthplan.io.planfile import load_plan_file

OUTCOMES: Counter = Counter()  # (family, outcome), reported at the end of the run (conftest)

CAP_SECONDS = 20  # a hang guard far above any case's run time


# -- the base scenario: three sectors, small tables ---------------------------------------

def flows_csv(names=("a", "b", "c")) -> str:
    a, b, c = names
    return (f"sector,{a},{b},{c},final_demand\n"
            f"{a},10,20,5,65\n{b},5,10,20,65\n{c},0,5,10,85\n"
            "gross_output,100,100,100,\nlabour,30,20,40,\n")


def capital_csv(names=("a", "b", "c")) -> str:
    a, b, c = names
    return ("sector,initial_capacity,mean_service_life,retirement,lead_time,spending_profile\n"
            f"{a},120,15,geometric,1,1\n{b},120,20,geometric,2,0.5;0.5\n"
            f"{c},120,10,geometric,1,1\n")


def stocks_csv(names=("a", "b", "c")) -> str:
    a, b, c = names
    return f"sector,{a},{b},{c}\n{a},50,40,30\n{b},100,80,60\n{c},0,0,0\n"


def plan_dict(names=("a", "b", "c")) -> dict:
    a, b, c = names
    return {
        "economy": {"flows": "flows.csv", "capital": "capital.csv",
                    "capital_stocks": "stocks.csv",
                    "consumption_basket": {a: 0.3, b: 0.3, c: 0.4}},
        "plan": {"years": {"first": 2030, "last": 2035},
                 "labour": {"start": 100.0, "growth": 0.01},
                 "consumption": {"floor": 10.0, "floor_growth": 0.01, "max_fall": 0.0},
                 "final_demand": {c: 5.0},
                 "final_demand_growth": 0.02,
                 "targets": [{"sector": a, "year": 2033, "capacity_at_least": 130.0}],
                 "terminal": {"rate": 0.02},
                 "objective": {"kind": "terminal_capacity"}},
        "solve": {"method": "auto", "time_limit": 60.0, "threads": 1},
    }


def dump(data) -> str:
    return yaml.safe_dump(data, sort_keys=False, default_flow_style=False)


BASE_YAML = dump(plan_dict())


def base_files(names=("a", "b", "c")) -> dict[str, str | bytes]:
    return {"flows.csv": flows_csv(names), "capital.csv": capital_csv(names),
            "stocks.csv": stocks_csv(names), "plan.yaml": dump(plan_dict(names))}


@dataclass
class Case:
    family: str
    name: str
    files: dict[str, str | bytes] = field(default_factory=dict)  # over the base files
    plan: str = "plan.yaml"
    setup: Callable[[Path], None] | None = None
    allow_outside: bool = False
    expect: str | None = None  # "loaded", "refused", or None when either is right
    check: Callable[[gp.Plan], None] | None = None
    says: str | None = None  # a refusal's message holds this (the cell it names)
    base: dict[str, str | bytes] = field(default_factory=base_files)

    @property
    def id(self) -> str:
        return f"{self.family}:{self.name}"


CASES: list[Case] = []


def add(family: str, name: str, **kw) -> None:
    taken = {c.id for c in CASES}
    base, n = name, 1
    while f"{family}:{name}" in taken:
        n += 1
        name = f"{base} #{n}"
    CASES.append(Case(family, name, **kw))


def with_plan(text: str) -> dict[str, str | bytes]:
    return {"plan.yaml": text}


def edit(path: tuple, value) -> str:
    data = plan_dict()
    node = data
    for part in path[:-1]:
        node = node[part]
    node[path[-1]] = value
    return dump(data)


def leaves(node, prefix=()):
    if isinstance(node, dict):
        for k, v in node.items():
            yield from leaves(v, (*prefix, k))
    elif isinstance(node, list):
        for i, v in enumerate(node):
            yield from leaves(v, (*prefix, i))
    else:
        yield prefix


# -- family: duplicate keys --------------------------------------------------------------
lines = BASE_YAML.splitlines()
for i, line in enumerate(lines):
    stripped = line.strip()
    if ":" in stripped and not stripped.startswith("-"):
        dup = "\n".join(lines[:i + 1] + [line] + lines[i + 1:]) + "\n"
        add("duplicate keys", f"line{i + 1}", files=with_plan(dup), expect="refused")
for text in ("{2030: 10, '2030': 11}", "{'2031': 1, 2031: 2}", "{2030: 1, 0x7EE: 2}",
             "{a: 1, 'a': 2}", "{1: 1, '1': 2}"):
    add("duplicate keys", f"mixed {text}", expect="refused", files=with_plan(
        BASE_YAML.replace("  consumption:\n", f"  series_probe: {text}\n  consumption:\n")))

# -- family: nesting depth -----------------------------------------------------------------
for depth in (2, 50, 96, 97, 98, 101, 150, 1000, 20000, 400000):
    for style, (open_, close) in {"list": ("[", "]"), "map": ("{k: ", "}")}.items():
        nested = open_ * depth + "1" + close * depth
        add("nesting", f"{style}{depth}", expect="refused",
            files=with_plan(BASE_YAML.replace("  labour:\n", f"  labour: {nested}\n  old:\n")))
block = "".join(f"{'  ' * (i + 1)}k{i}:\n" for i in range(120)) + "  " * 121 + "end: 1\n"
add("nesting", "block120", files=with_plan("deep:\n" + block), expect="refused")

# -- family: anchors and aliases -------------------------------------------------------------


def laughs(levels: int) -> str:
    out = ['lol0: &l0 ["lol", "lol", "lol", "lol", "lol", "lol", "lol", "lol", "lol"]']
    for i in range(1, levels + 1):
        out.append(f"lol{i}: &l{i} [" + ", ".join([f"*l{i - 1}"] * 9) + "]")
    return "\n".join(out) + "\n"


for levels in range(1, 10):
    add("aliases", f"laughs{levels}", files=with_plan(laughs(levels)), expect="refused")
add("aliases", "laughs-in-series", expect="refused", files=with_plan(
    laughs(9) + BASE_YAML.replace("  labour:\n", "  labour:\n    series: *l9\n")))
for text in ("x: &a 1\ny: *a\n", "x: &a 1\n", "y: *undefined\n", "x: &a [*a]\n",
             "base: &b {floor: 1}\nc: {<<: *b}\n", "c: {<<: {floor: 1}, x: 2}\n",
             "x: !!python/object/apply:os.system ['true']\n", "x: !!binary aGVsbG8=\n"):
    add("aliases", text.strip().replace("\n", " / "), files=with_plan(text + BASE_YAML),
        expect="refused")

# -- family: years ----------------------------------------------------------------------------
RAW_YEARS = ["on", "off", "yes", "no", "true", "null", "~", "2030.7", "2030.0", "'2030'",
             "-5", "0", "1" + "0" * 30, "2030-01-01", "[2030]", "{a: 1}", ".inf", ".nan",
             "0x7EE", "2_030", "1e3"]
for which in ("first", "last"):
    good = "first: 2030" if which == "first" else "last: 2035"
    for raw in RAW_YEARS:
        add("years", f"{which}={raw}", expect=None if raw in ("0x7EE", "2_030") else "refused",
            files=with_plan(BASE_YAML.replace(good, f"{which}: {raw}")))
for span in (0, 1, 999, 1000, 1001, 10**6, -1, 10**40):
    add("years", f"span{span}", expect="refused" if span > 1000 or span < 0 else None,
        files=with_plan(BASE_YAML.replace("last: 2035", f"last: {2030 + span}")))
for text in ("[]", "[2030]", "[2030.5, 2031.5]", "[true, false]", "[2030, 2030]",
             "[2030, 2031, 2032]", "['2030', '2031']", "[null]", "[2030, 3500]",
             "[" + ", ".join(str(y) for y in range(2000, 3100)) + "]", "{first: 2030}",
             "{first: 2030, last: 2031, step: 1}", "2030", "'2030-2035'"):
    expect = "loaded" if text == "[2030, 2031, 2032]" else None
    if text.startswith("[" + "2000"):
        expect = "refused"
    add("years", f"years={text[:40]}", expect=expect, files=with_plan(BASE_YAML.replace(
        "  years:\n    first: 2030\n    last: 2035\n", f"  years: {text}\n")))

# -- family: year-keyed series ------------------------------------------------------------------
SERIES = {
    "float keys": "{2030.7: 10, 2031: 10, 2032: 10, 2033: 10, 2034: 10, 2035: 10}",
    "bool key": "{on: 10, 2031: 10}",
    "null key": "{null: 10}",
    "date key": "{2030-01-01: 10}",
    "list key": "{[2030]: 10}",
    "int keys": "{2030: 10, 2031: 10, 2032: 10, 2033: 10, 2034: 10, 2035: 10}",
    "text keys": "{'2030': 10, '2031': 10, '2032': 10, '2033': 10, '2034': 10, '2035': 10}",
    "mixed dup": "{2030: 10, '2030': 10, 2031: 10, 2032: 10, 2033: 10, 2034: 10, 2035: 10}",
    "missing year": "{2030: 10}",
    "extra year": "{1999: 10, 2030: 10, 2031: 10, 2032: 10, 2033: 10, 2034: 10, 2035: 10}",
    "bool values": "{2030: true, 2031: 10, 2032: 10, 2033: 10, 2034: 10, 2035: 10}",
    "null values": "{2030: null, 2031: 10, 2032: 10, 2033: 10, 2034: 10, 2035: 10}",
    "nan values": "{2030: .nan, 2031: 10, 2032: 10, 2033: 10, 2034: 10, 2035: 10}",
    "text values": "{2030: ten, 2031: 10, 2032: 10, 2033: 10, 2034: 10, 2035: 10}",
    "huge values": "{2030: 1e999, 2031: 10, 2032: 10, 2033: 10, 2034: 10, 2035: 10}",
}
for name, text in SERIES.items():
    expect = {"int keys": "loaded", "text keys": "loaded", "bool values": None}.get(
        name, "refused")
    add("year keys", name, expect=expect, files=with_plan(
        BASE_YAML.replace("    floor: 10.0\n", f"    floor: {text}\n")))

# -- family: table paths and special files ------------------------------------------------------


def _symlink(name: str, target: str) -> Callable[[Path], None]:
    return lambda d: os.symlink(target, d / name)


def _outside_copy(d: Path) -> None:
    (d.parent / "flows.csv").write_text(flows_csv())


def _fifo(d: Path) -> None:
    os.mkfifo(d / "fifo.csv")


def _folder(d: Path) -> None:
    (d / "sub").mkdir()
    (d / "sub" / "flows.csv").write_text(flows_csv())


def _sparse(d: Path) -> None:
    with open(d / "big.csv", "wb") as f:
        f.truncate(65 << 20)  # over the 64 MB table limit, without writing it


def _loop(d: Path) -> None:
    os.symlink(d / "loop2.csv", d / "loop1.csv")
    os.symlink(d / "loop1.csv", d / "loop2.csv")


PATHS: dict[str, tuple[Callable[[Path], None] | None, str | None]] = {
    "../flows.csv": (_outside_copy, "refused"),
    "../../../../../../../../etc/passwd": (None, "refused"),
    "/etc/passwd": (None, "refused"),
    "/dev/zero": (None, "refused"),
    "/dev/null": (None, "refused"),
    "/proc/self/environ": (None, "refused"),
    "link_out.csv": (lambda d: (_outside_copy(d), os.symlink(d.parent / "flows.csv",
                                                            d / "link_out.csv")), "refused"),
    "link_dev.csv": (_symlink("link_dev.csv", "/dev/zero"), "refused"),
    "loop1.csv": (_loop, "refused"),
    "sub": (_folder, "refused"),
    "sub/flows.csv": (_folder, None),
    "sub/../flows.csv": (_folder, None),
    "./flows.csv": (None, None),
    "fifo.csv": (_fifo, "refused"),
    "big.csv": (_sparse, "refused"),
    "missing.csv": (None, "refused"),
    "": (None, "refused"),
    ".": (None, "refused"),
    "x" * 5000: (None, "refused"),
    "nul\0.csv": (None, "refused"),
}
for field_name in ("flows", "capital", "capital_stocks"):
    for value, (setup, expect) in PATHS.items():
        if field_name != "flows" and value in ("sub/flows.csv", "sub/../flows.csv",
                                               "./flows.csv"):
            continue
        add("table paths", f"{field_name}={value[:30]!r}", setup=setup,
            expect=expect, files=with_plan(edit(("economy", field_name), value)))
for value, (setup, expect) in {"../flows.csv": (_outside_copy, "loaded"),
                               "/dev/zero": (None, "refused"),
                               "fifo.csv": (_fifo, "refused"),
                               "big.csv": (_sparse, "refused"),
                               "/etc/passwd": (None, "refused"),
                               "sub": (_folder, "refused")}.items():
    add("table paths", f"outside allowed {value!r}", setup=setup, allow_outside=True,
        expect=expect, files=with_plan(edit(("economy", "flows"), value)))


def _plan_is_folder(d: Path) -> None:
    (d / "dir.yaml").mkdir()


def _plan_is_fifo(d: Path) -> None:
    os.mkfifo(d / "fifo.yaml")


def _plan_sparse(d: Path) -> None:
    with open(d / "big.yaml", "wb") as f:
        f.truncate((5 << 20) + 1)


add("plan file", "a folder", plan="dir.yaml", setup=_plan_is_folder, expect="refused")
add("plan file", "a pipe", plan="fifo.yaml", setup=_plan_is_fifo, expect="refused")
add("plan file", "over 5 MB", plan="big.yaml", setup=_plan_sparse, expect="refused")
add("plan file", "missing", plan="missing.yaml", expect="refused")
add("plan file", "symlink to /dev/zero", plan="z.yaml",
    setup=_symlink("z.yaml", "/dev/zero"), expect="refused")
add("plan file", "no suffix", plan="plan", files={"plan": BASE_YAML}, expect="refused")

# -- family: numbers ----------------------------------------------------------------------------
NUMBERS = ["1e999", "-1e999", ".nan", "9" * 4400, "9" * 300, "0x10"]
NUMERIC = [("plan", "labour", "start"), ("plan", "labour", "growth"),
           ("plan", "consumption", "floor"), ("plan", "final_demand", "c"),
           ("plan", "targets", 0, "capacity_at_least"), ("plan", "targets", 0, "year"),
           ("plan", "terminal", "rate"), ("solve", "threads"),
           ("economy", "consumption_basket", "a")]
for path in NUMERIC:
    for raw in NUMBERS:
        marker = 123456.789
        text = edit(path, marker).replace(str(marker), raw)
        add("numbers", f"{'.'.join(map(str, path))}={raw[:12]}", files=with_plan(text))

# -- family: wrong types (every leaf of the base plan) ------------------------------------------
JUNK = [None, "text", [1, 2]]
for path in leaves(plan_dict()):
    for junk in JUNK:
        add("types", f"{'.'.join(map(str, path))}={junk!r}", files=with_plan(edit(path, junk)))

# -- family: bytes and encodings of the plan file -------------------------------------------------
BYTES = {
    "utf-16": BASE_YAML.encode("utf-16"),
    "utf-8 BOM": b"\xef\xbb\xbf" + BASE_YAML.encode(),
    "NUL byte": BASE_YAML.encode().replace(b"plan:", b"pl\0an:", 1),
    "latin-1": BASE_YAML.replace("auto", "aut\xe9").encode("latin-1"),
    "bell": BASE_YAML.replace("auto", "aut\x07").encode(),
    "tabs": BASE_YAML.replace("  ", "\t").encode(),
    "CRLF": BASE_YAML.replace("\n", "\r\n").encode(),
    "empty": b"",
    "comment only": b"# nothing here\n",
    "null": b"null\n",
    "list": b"[1, 2]\n",
    "number": b"42\n",
    "two documents": (BASE_YAML + "---\n" + BASE_YAML).encode(),
    "1 MB line": BASE_YAML.replace("terminal_capacity", "a" * (1 << 20)).encode(),
    "unclosed": b"economy: {flows: [\n",
    "lone surrogate escape": BASE_YAML.replace("auto", '"\\ud800"').encode(),
}
for name, data in BYTES.items():
    add("bytes", name, files={"plan.yaml": data},
        expect=None if name in ("utf-8 BOM", "CRLF") else "refused")
add("bytes", "just over 5 MB", expect="refused",
    files={"plan.yaml": BASE_YAML + "#" + "x" * (5 << 20) + "\n"})

# -- family: TOML -------------------------------------------------------------------------------
TOML = ('[economy]\nflows = "flows.csv"\ncapital = "capital.csv"\n'
        'capital_stocks = "stocks.csv"\nconsumption_basket = {a = 1.0}\n'
        '[plan]\nyears = {first = 2030, last = 2035}\n'
        '[plan.consumption]\nfloor = 10.0\n')
for name, text in {
    "base": TOML,
    "bool first": TOML.replace("first = 2030", "first = true"),
    "float first": TOML.replace("first = 2030", "first = 2030.7"),
    "span": TOML.replace("last = 2035", "last = 999999"),
    "duplicate key": TOML + "[plan.consumption]\nfloor = 2.0\n",
    "deep array": TOML.replace("floor = 10.0", "floor = " + "[" * 5000 + "]" * 5000),
    "deep 120": TOML.replace("floor = 10.0", "floor = " + "[" * 120 + "]" * 120),
    "huge int": TOML.replace("floor = 10.0", "floor = " + "9" * 5000),
    "date": TOML.replace("first = 2030", "first = 2030-01-01"),
    "text year keys": TOML.replace("floor = 10.0", 'floor = {"2030" = 10, "2031" = 10, '
                                   '"2032" = 10, "2033" = 10, "2034" = 10, "2035" = 10}'),
    "path escape": TOML.replace('"flows.csv"', '"../../../etc/passwd"'),
}.items():
    expect = "loaded" if name in ("base", "text year keys") else "refused"
    add("toml", name, plan="plan.toml", files={"plan.toml": text}, expect=expect)

# -- family: CSV tables ---------------------------------------------------------------------------
flows_lines = flows_csv().splitlines()
for cell in ("NA", "nan", "null", "None", "N/A", "abc", "inf", "-inf", "-1", "1e999", "",
             "0x10", "9" * 400, "  7  ", "+5", "1e-320", '"1,5"', "1,5", "#REF!", "TRUE"):
    row = flows_lines[1].split(",")
    row[2] = cell
    text = "\n".join([flows_lines[0], ",".join(row), *flows_lines[2:]]) + "\n"
    expect = "refused" if cell in ("NA", "nan", "null", "None", "N/A", "abc", "inf", "-inf",
                                   "-1", "1e999", "#REF!", "TRUE", "1,5") else None
    add("csv", f"flows cell {cell[:12]!r}", files={"flows.csv": text}, expect=expect)


def _names_kept(names):
    def check(plan: gp.Plan) -> None:
        assert plan.economy.names == list(names), plan.economy.names
    return check


for label in ("NA", "null", "None", "nan", "NaN", "N/A", "#N/A", "n/a", "1", "01", "1.0",
              "1e3", "true", "no", "-", "2030"):
    names = (label, "b", "c")
    add("csv", f"sector named {label!r}", base=base_files(names), expect="loaded",
        check=_names_kept(names))
STRUCTURE = {
    "duplicate column": flows_csv().replace("sector,a,b,c", "sector,a,a,c"),
    "empty header cell": flows_csv().replace("sector,a,b,c", "sector,a,,c"),
    "no gross_output": flows_csv().replace("gross_output", "gross"),
    "duplicate row": flows_csv() + "a,1,1,1,1\n",
    "unlabelled row": flows_csv() + ",1,2,3,4\n",
    "blank trailing row": flows_csv() + ",,,,\n",
    "ragged long row": flows_csv().replace("a,10,20,5,65", "a,10,20,5,65,99"),
    "ragged short row": flows_csv().replace("a,10,20,5,65", "a,10"),
    "unclosed quote": flows_csv().replace("a,10", 'a,"10'),
    "BOM": "\ufeff" + flows_csv(),
    "CRLF": flows_csv().replace("\n", "\r\n"),
    "header only": "sector,a,b,c,final_demand\n",
    "empty": "",
    "wide header": "sector," + ",".join(f"s{i}" for i in range(20000)) + "\n",
    "semicolons": flows_csv().replace(",", ";"),
    "labour kinds": flows_csv().replace("labour,30,20,40,", "labour:x,30,20,40,\nlabour:,1,1,1,"),
}
for name, text in STRUCTURE.items():
    expect = None if name in ("blank trailing row", "BOM", "CRLF", "labour kinds") else "refused"
    add("csv", f"flows {name}", files={"flows.csv": text}, expect=expect)
for name, data in {"latin-1": "sector,caf\xe9\n".encode("latin-1"),
                   "NUL": flows_csv().replace("10", "1\x000", 1).encode(),
                   "binary": bytes(range(256)) * 4}.items():
    add("csv", f"flows {name}", files={"flows.csv": data}, expect="refused")
cap_lines = capital_csv().splitlines()
for column, values in {"lead_time": ["2.5", "-1", "x", "1e9", "", "NA"],
                       "retirement": ["", "x", "1", "NA"],
                       "spending_profile": ["0.5;x", ";", "1;", "nan", "1e999"],
                       "mean_service_life": ["0", "-1", "inf", "NA"],
                       "initial_capacity": ["-5", "", "None"]}.items():
    col = cap_lines[0].split(",").index(column)
    for value in values:
        row = cap_lines[1].split(",")
        row[col] = value
        text = "\n".join([cap_lines[0], ",".join(row), *cap_lines[2:]]) + "\n"
        expect = None if value == "" else "refused"
        add("csv", f"capital {column}={value!r}", files={"capital.csv": text}, expect=expect)

# -- family: Excel workbooks --------------------------------------------------------------------


def _workbook(formula: bool = False, empty: bool = False) -> Callable[[Path], None]:
    def setup(d: Path) -> None:
        import openpyxl

        wb = openpyxl.Workbook()
        ws = wb.active
        if not empty:
            for line in flows_csv().splitlines():
                ws.append([float(v) if v.replace(".", "").isdigit() else (v or None)
                           for v in line.split(",")])
            if formula:
                ws["C2"] = "=B2*2"  # saved by a script: no cached result
        wb.save(d / "flows.xlsx")
    return setup


def _corrupt(data: bytes) -> Callable[[Path], None]:
    return lambda d: (d / "flows.xlsx").write_bytes(data)


def _truncated(d: Path) -> None:
    _workbook()(d)
    raw = (d / "flows.xlsx").read_bytes()
    (d / "flows.xlsx").write_bytes(raw[: len(raw) // 2])


XLSX_PLAN = with_plan(edit(("economy", "flows"), "flows.xlsx"))
for name, (setup, expect) in {"good": (_workbook(), "loaded"),
                              "formula without result": (_workbook(formula=True), "refused"),
                              "empty sheet": (_workbook(empty=True), "refused"),
                              "not a zip": (_corrupt(b"not a workbook"), "refused"),
                              "zip junk": (_corrupt(b"PK\x03\x04" + b"\0" * 100), "refused"),
                              "truncated": (_truncated, "refused")}.items():
    add("xlsx", name, setup=setup, expect=expect, files=XLSX_PLAN)
add("xlsx", "old .xls", files={**with_plan(edit(("economy", "flows"), "flows.xls")),
                               "flows.xls": b"\xd0\xcf\x11\xe0junk"}, expect="refused")


# -- family: a bad cell is named by its labels, its file and its value ------------------------

def _year_list(value) -> str:
    data = plan_dict()
    data["plan"]["final_demand"] = {"c": [5.0, 5.0, 5.0, value, 5.0, 5.0]}
    return dump(data)


def _year_map(value) -> str:
    data = plan_dict()
    data["plan"]["final_demand"] = {"c": {2030 + i: value if i == 3 else 5.0 for i in range(6)}}
    return dump(data)


for name, files, says in [
        ("negative flow", {"flows.csv": flows_csv().replace("b,5,10,20", "b,5,-10,20")},
         "flows (flows.csv)[b, b] must be a finite flow >= 0 (a blank cell reads as 0). "
         "Got -10.0."),
        ("infinite flow", {"flows.csv": flows_csv().replace("c,0,5,10", "c,0,5,inf")},
         "flows (flows.csv)[c, c] must be a finite flow >= 0"),
        ("negative capital stock", {"stocks.csv": stocks_csv().replace("b,100,80", "b,100,-80")},
         "capital_stocks (stocks.csv)[b, b] must be a finite capital stock >= 0. Got -80.0."),
        ("negative year in a list", with_plan(_year_list(-4.0)),
         "line 25: plan.final_demand.c[2033] must hold finite values >= 0. Got -4.0."),
        ("text year in a list", with_plan(_year_list("x")),
         "line 25: plan.final_demand.c[2033] must hold numbers. Got 'x'."),
        ("negative year in a mapping", with_plan(_year_map(-4.0)),
         "line 25: plan.final_demand.c[2033] must hold finite values >= 0. Got -4.0.")]:
    add("cells named", name, files=files, expect="refused", says=says)



# -- family: names unsafe for the files they reach (control characters, length, case) ------

for name, names, says in [
        ("bell in a name", ("a\x07", "b", "c"), "must hold no control characters"),
        ("escape in a name", ("a", "b\x1b[2J", "c"), "must hold no control characters"),
        ("name over a workbook cell", ("a", "b", "c" * 32_768),
         "must be at most 32,767 characters (the most a workbook cell holds"),
        ("names differing by case", ("a", "B", "b"),
         "must differ by more than case or Unicode normal form"),
        ("names differing by normal form", ("a", "\u00e9", "e\u0301"),
         "must differ by more than case or Unicode normal form")]:
    add("unsafe names", name, base=base_files(names), expect="refused", says=says)
add("unsafe names", "formula-like names load", base=base_files(("=1+1", "@b", "-c")),
    expect="loaded")

# -- family: tables whose shape a reader would misread ---------------------------------------

_labour = flows_csv().splitlines()[-1]
for name, files, says in [
        ("semicolons", {"flows.csv": flows_csv().replace(",", ";")},
         "(its first line is separated by semicolons"),
        ("tabs", {"flows.csv": flows_csv().replace(",", "\t")},
         "(its first line is separated by tabs"),
        ("labour row twice", {"flows.csv": flows_csv() + _labour + "\n"},
         "must have each row label once. Got ['labour']"),
        ("a million columns", {"flows.csv": "sector," + ",".join(
            f"c{i}" for i in range(10**6)) + "\na," + "1," * 10**6 + "\n"},
         "must have at most 100,000 columns")]:
    add("table shape", name, files=files, expect="refused", says=says)


def _hidden_first_sheet(d: Path) -> None:
    import openpyxl

    _workbook()(d)
    wb = openpyxl.load_workbook(d / "flows.xlsx")
    old = wb.create_sheet("old figures", 0)
    old.append(["sector", "a"])
    old.sheet_state = "hidden"
    wb.save(d / "flows.xlsx")


add("table shape", "hidden first sheet", setup=_hidden_first_sheet, files=XLSX_PLAN,
    expect="refused", says="'old figures' is hidden")
add("toml", "byte-order mark", plan="plan.toml", files={"plan.toml": "\ufeff" + TOML},
    expect="loaded")

# -- the test --------------------------------------------------------------------------------

class CaseTimeout(BaseException):
    """Raised by the hang guard (a BaseException, so no library handler swallows it)."""


@contextlib.contextmanager
def time_cap(seconds: float):
    def fire(signum, frame):
        raise CaseTimeout(f"case still running after {seconds} s")

    previous = signal.signal(signal.SIGALRM, fire)
    signal.setitimer(signal.ITIMER_REAL, seconds)
    try:
        yield
    finally:
        signal.setitimer(signal.ITIMER_REAL, 0)
        signal.signal(signal.SIGALRM, previous)


def test_enough_cases():
    assert len(CASES) >= 300
    assert len({c.id for c in CASES}) == len(CASES)


@pytest.mark.parametrize("case", CASES, ids=[c.id for c in CASES])
def test_hostile_file(case: Case, tmp_path: Path):
    folder = tmp_path / "plans"
    folder.mkdir()
    for name, content in {**case.base, **case.files}.items():
        target = folder / name
        if isinstance(content, bytes):
            target.write_bytes(content)
        else:
            target.write_text(content, encoding="utf-8", newline="")
    if case.setup is not None:
        case.setup(folder)
    message = ""
    plan = None
    with time_cap(CAP_SECONDS):
        try:
            plan = load_plan_file(folder / case.plan, allow_outside=case.allow_outside)
            outcome = "loaded"
        except gp.InvalidInput as exc:
            outcome, message = "refused", str(exc)
    OUTCOMES[case.family, outcome] += 1
    if outcome == "refused":
        assert len(message) < 3000, message[:200]  # values are shown truncated
        assert case.plan.split(".")[0] in message or "flows" in message, message
    if case.expect is not None:
        assert outcome == case.expect, message or "loaded"
    if case.says is not None:
        assert case.says in message, message
    if plan is not None:
        assert isinstance(plan, gp.Plan) and np.all(np.isfinite(
            plan.economy.input_coefficients))
        if case.check is not None:
            case.check(plan)
