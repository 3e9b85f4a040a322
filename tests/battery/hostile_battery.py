#!/usr/bin/env python3
"""The hostile-input battery: generates hostile inputs for every command of contrast-bench-cli
and checks how each is met.

Inputs: every key of both file formats (scheme version 1, design version 2) with every wrong
JSON type; every numeric option at its extremes; every kind of path (missing, folder, /dev/zero,
/dev/null, FIFO, standard input, empty, unreadable); hostile data files for fit.

Checks for every run: no signal (crash), no hang (timeout), exit 0 or 2 only, a message on
stderr for exit 2 that names its place (the file, the option, the key or the line) and is of a
readable length, no NaN or infinity in the output, and no silent acceptance: a key of the wrong
type must be refused. At the limits that `analyze --help` states (levels per factor, cells in a
design) the commands answer; one past each they refuse with exit 2, naming the option or field.

Usage: hostile_battery.py CLI [--list] [--workers N]. Exit 0 when every case passes.
Standard library only.
"""
import concurrent.futures
import copy
import json
import os
import re
import stat
import subprocess
import sys
import tempfile
import threading

TIMEOUT = 10  # seconds; every case answers far sooner
MAX_MESSAGE = 2000  # characters; longer messages swamp the terminal

SCHEME = {
    "format": "contrast-bench-scheme",
    "version": 1,
    "factor": {"name": "dose", "levels": ["low", "mid", "high"], "n": ["10", "12", "8"], "spacing": ["0", "1", "3"],
               "measured": "between"},
    "scheme": {"kind": "polynomial", "polynomial_form": "integer", "polynomial_weighted": False},
    "intercept": True,
    "columns": [
        {"name": "linear", "named": True, "named_for": ["-1/2", "0", "1/2"], "weights": ["-1", "0", "1"]},
        {"name": "quadratic", "weights": ["1", "-2", "1"]},
    ],
    "notes": "an invented plan",
    "power": {
        "levels": [{"level": "low", "expected": "10", "sd": "4", "ratio": "1"}, {"level": "mid", "expected": "12"}],
        "expected": "differences", "baseline": "low", "sd": "4", "sd_per_level": False, "sizes": "ratios", "total": "60",
        "correlation": "0.5", "correlation_matrix": False, "correlations": "", "alpha": "0.05", "target": "0.8",
        "sided": "two", "adjustment": "sidak",
    },
}

DESIGN = {
    "format": "contrast-bench-scheme",
    "version": 2,
    "design": {
        "cell_n": ["6", "6", "6", "5", "6", "4"],
        "factors": [
            {
                "factor": {"name": "margin", "levels": ["bare", "grass", "wild"]},
                "scheme": {"kind": "treatment", "reference": "bare"},
                "columns": [{"name": "grass", "weights": ["0", "1", "0"]}, {"name": "wild", "weights": ["0", "0", "1"]}],
            },
            {
                "factor": {"name": "mowing", "levels": ["early", "late"]},
                "scheme": {"kind": "treatment", "reference": "early"},
                "columns": [{"name": "late", "weights": ["0", "1"]}],
            },
        ],
        "terms": [{"factors": ["margin"]}, {"factors": ["mowing"]}, {"factors": ["margin", "mowing"], "within": "margin"}],
    },
    "intercept": True,
    "notes": "an invented design",
}

# Every JSON type, each as a wrong value for keys of another type.
WRONG = {
    "null": None,
    "true": True,
    "number": 12,
    "negative": -1,
    "huge number": 1e300,
    "string": "text",
    "empty string": "",
    "array": [],
    "array of null": [None],
    "object": {},
}

# Keys where a value of this JSON type (besides the key's own type) is accepted on purpose.
ACCEPTED = {
    "factor.n": {"null"},  # null means "no planned sizes"
    "factor.spacing": {"null"},  # null means "equal spacing"
    "design.cell_n": {"null"},  # null means "equal cells"
    "columns[0].named_for": {"null"},  # null means "not recorded": filled in when read
    # A weight, size or position may be a JSON number, read as the decimal it shows.
    "columns[0].weights[0]": {"number", "negative", "huge number"},
    "columns[0].named_for[0]": {"number", "negative", "huge number"},
    "factor.n[0]": {"number", "huge number"},
    "factor.spacing[0]": {"number", "negative", "huge number"},
    "design.cell_n[0]": {"number", "huge number"},
    # The power plan keeps numbers as typed texts; a JSON number is read as the decimal it shows,
    # and its value is checked where it is used (the Power tab, `power --file`), not on loading.
    **{f"power.{key}": {"number", "negative", "huge number"}
       for key in ("sd", "total", "correlation", "correlations", "alpha", "target",
                   "levels[0].expected", "levels[0].sd", "levels[0].ratio")},
}


def type_of(value):
    if value is None:
        return "null"
    if isinstance(value, bool):
        return "bool"
    if isinstance(value, (int, float)):
        return "number"
    if isinstance(value, str):
        return "string"
    if isinstance(value, list):
        return "array"
    return "object"


def key_paths(node, prefix=""):
    """Every (path, parent, key) in a JSON document, e.g. ('factor.levels[0]', list, 0)."""
    items = node.items() if isinstance(node, dict) else enumerate(node)
    for key, value in items:
        if isinstance(node, dict):
            path = f"{prefix}.{key}" if prefix else key
        else:
            path = f"{prefix}[{key}]"
        yield path, node, key
        if isinstance(value, (dict, list)):
            # One item of an array stands for all.
            if isinstance(value, list) and len(value) > 1:
                yield from key_paths(value[:1] if not isinstance(value[0], (dict, list)) else [value[0]], path)
            else:
                yield from key_paths(value, path)


def locate(doc, path):
    """The (parent, key) that path names in doc."""
    node = doc
    tokens = re.findall(r"[^.\[\]]+|\[\d+\]", path)
    for t in tokens[:-1]:
        node = node[int(t[1:-1])] if t.startswith("[") else node[t]
    last = tokens[-1]
    return (node, int(last[1:-1])) if last.startswith("[") else (node, last)


def generic(path):
    """design.factors[1].factor.n[0] -> factor.n[0]; the key without its place in a design."""
    return re.sub(r"^design\.factors\[\d+\]\.", "", path)


class Case:
    def __init__(self, name, args, stdin=None, files=None, refuse=False, place=None, kind="option", accept=False):
        self.name = name
        self.accept = accept  # must exit 0 (input at a stated limit)
        self.args = args
        self.stdin = stdin
        self.files = files or {}
        self.refuse = refuse  # must exit 2
        self.place = place  # text the message must contain
        self.kind = kind


def file_cases(tmp):
    cases = []
    for base_name, base in (("scheme", SCHEME), ("design", DESIGN)):
        seen = set()
        for path, _, _ in list(key_paths(base)):
            own = type_of(locate(base, path)[0][locate(base, path)[1]])
            for wrong_name, wrong in WRONG.items():
                wrong_type = type_of(wrong)
                if wrong_type == own and not (own == "array" and wrong_name == "array of null"):
                    continue
                doc = copy.deepcopy(base)
                parent, key = locate(doc, path)
                parent[key] = copy.deepcopy(wrong)
                text = json.dumps(doc)
                if text in seen:
                    continue
                seen.add(text)
                file_name = os.path.join(tmp, f"{base_name}-{len(cases)}.json")
                accepted = wrong_name in ACCEPTED.get(generic(path), set())
                # Keys whose wrong value may still be meaningful: notes and names accept any string.
                refuse = not accepted and not (own == "string" and wrong_type == "string")
                # An array standing for all its items: an empty one may be fine (columns: no; n: count).
                means = "0,1,2" if base is SCHEME else "0,1,2,3,4,5"
                commands = (["analyze"], ["export", "--format", "csv"], ["power", "--means", means, "--sd", "1"],
                            ["compare", "--with", "sum"], ["sheet", "--date", "2026-01-01", "-o", "-"])
                # The commands share one loader: each key and type goes to one of them in turn.
                for command in [commands[len(seen) % len(commands)]]:
                    cases.append(Case(f"{base_name} {path} = {wrong_name} ({command[0]})",
                                      command + ["--file", file_name], files={file_name: text},
                                      refuse=refuse, place=file_name if refuse else None, kind="json"))
    return cases


EXTREMES = ["0", "-0", "1e-300", "1e300", "nan", "inf", "-inf", "-1", "99999999999999999999999", "4.9e-324", "", "x"]


def option_cases():
    cases = []
    levels = ["--levels", "a,b,c,d"]
    for value in EXTREMES:
        four = ",".join([value] * 4)
        mixed = f"1,2,3,{value}" if value else "1,2,3,"
        spread = f"{value},-{value},1e-300,0" if value else ","
        runs = [
            (["analyze"] + levels + ["--scheme", "polynomial", "--spacing", mixed], "--spacing"),
            (["analyze"] + levels + ["--scheme", "polynomial", "--spacing", spread], "--spacing"),
            (["export", "--format", "csv"] + levels + ["--scheme", "polynomial", "--spacing", spread], "--spacing"),
            (["analyze"] + levels + ["--scheme", "weighted-effect", "--n", mixed], "--n"),
            (["analyze"] + levels + ["--columns", f"1,-1,0,{value};0,1,-1,0"], "--columns"),
            (["export", "--format", "r"] + levels + ["--columns", f"1,-1,0,{value}"], "--columns"),
            (["design"] + levels + ["--hypotheses", f"1,-1,0,{value}"], "--hypotheses"),
        ]
        power = levels + ["--scheme", "helmert"]
        ok = {"--means": "0,1,2,3", "--sd": "1", "--n": "10,10,10,10"}
        for option in ("--means", "--sd", "--n", "--alpha", "--target"):
            chosen = dict(ok)
            chosen[option] = four if option in ("--means", "--n") else value
            args = ["power"] + power
            for k, v in chosen.items():
                args += [k, v]
            runs.append((args, option))
        runs.append((["power"] + power + ["--means", "0,1,2,3", "--sds", mixed, "--n", "10,10,10,10"], "--sds"))
        runs.append((["power"] + power + ["--means", "0,1,2,3", "--sd", "1", "--ratios", mixed, "--total", "40"], "--ratios"))
        runs.append((["power"] + power + ["--means", "0,1,2,3", "--sd", "1", "--total", value], "--total"))
        runs.append((["power"] + power + ["--means", "0,1,2,3", "--sd", "1", "--within", "--correlation", value, "-n", "10"],
                     "--correlation"))
        runs.append((["power"] + power + ["--differences", f"1,2,{value}", "--sd", "1", "--n", "10,10,10,10"], "--differences"))
        for args, option in runs:
            cases.append(Case(f"{' '.join(args[:1])} {option} {value!r}", args, place=None, kind="option"))
    # Sizes that overflow what the library can evaluate (a noncentrality above 4e9).
    cases.append(Case("power n 1e10", ["power", "--levels", "a,b", "--scheme", "treatment", "--means", "0,1", "--sd", "1", "-n", "1e10,1e10"]))
    cases.append(Case("power alpha 1e-300", ["power", "--levels", "a,b,c", "--scheme", "treatment", "--means", "0,1,2", "--sd", "1", "--total", "100", "--alpha", "1e-300"]))
    return cases


def stated_limits(cli):
    """The limits as the help states them: (levels per factor, cells in a design)."""
    text = subprocess.run([cli, "analyze", "--help"], capture_output=True, text=True, timeout=TIMEOUT).stdout
    text = " ".join(text.split())
    levels = re.search(r"at most (\d+) levels per factor", text)
    cells = re.search(r"at most (\d+) cells", text)
    if not levels or not cells:
        sys.exit("analyze --help states no limits of levels and cells")
    return int(levels.group(1)), int(cells.group(1))


def limit_cases(tmp, cli):
    """At each stated limit the commands answer; one past it they refuse, naming the place."""
    max_levels, max_cells = stated_limits(cli)
    cases = []
    for count in (max_levels, max_levels + 1):
        names = ",".join(f"L{i + 1}" for i in range(count))
        over = count > max_levels
        for command in (["analyze"], ["analyze", "--json"], ["export", "--format", "latex", "--matrix", "hypotheses"]):
            cases.append(Case(f"limit {count} levels ({' '.join(command)})", command + ["--levels", names, "--scheme", "helmert"],
                              refuse=over, place="--levels" if over else None, accept=not over))
        if over:
            cases.append(Case(f"limit {count} levels (design)", ["design", "--levels", names, "--hypotheses", "1,-1" + ",0" * (count - 2)],
                              refuse=True, place="--levels"))
            doc = copy.deepcopy(SCHEME)
            doc["factor"] = {"name": "many", "levels": names.split(",")}
            doc["scheme"] = {"kind": "treatment"}
            doc["columns"] = [{"name": f"c{j}", "weights": ["1" if i == j else "0" for i in range(count)]} for j in range(1, count)]
            path = os.path.join(tmp, "limit-levels.json")
            cases.append(Case(f"limit {count} levels (scheme file)", ["analyze", "--file", path], files={path: json.dumps(doc)},
                              refuse=True, place="factor.levels", kind="json"))
    # Two factors a x b: the largest at the limit with a and b close, then one past the limit.
    a = 2
    while (a + 1) * (a + 1) <= max_cells:
        a += 1
    for first, second in ((a, max_cells // a), (2, max_cells // 2 + 1)):
        doc = copy.deepcopy(DESIGN)
        for f, k in enumerate((first, second)):
            factor = doc["design"]["factors"][f]
            factor["factor"]["levels"] = [f"{factor['factor']['name']}{i + 1}" for i in range(k)]
            factor["scheme"] = {"kind": "sum"}
            factor["columns"] = [{"name": f"c{j + 1}", "weights": ["1" if i == j else "-1" if i == k - 1 else "0" for i in range(k)]}
                                 for j in range(k - 1)]
        doc["design"]["cell_n"] = [str(3 + c % 4) for c in range(first * second)]
        doc["design"]["terms"] = [{"factors": ["margin"]}, {"factors": ["mowing"]}, {"factors": ["margin", "mowing"]}]
        over = first * second > max_cells
        path = os.path.join(tmp, f"limit-cells-{first * second}.json")
        for command in (["analyze", "--json"], ["export", "--format", "csv", "--matrix", "hypotheses"]):
            cases.append(Case(f"limit {first * second} cells ({command[0]})", command + ["--file", path],
                              files={path: json.dumps(doc)}, refuse=over, place="design.factors" if over else None,
                              kind="json", accept=not over))
    return cases


def path_cases(tmp):
    cases = []
    folder = tmp
    empty = os.path.join(tmp, "empty.json")
    unreadable = os.path.join(tmp, "unreadable.json")
    scheme_text = json.dumps(SCHEME)
    design_text = json.dumps(DESIGN)
    kinds = {
        "missing": ("/nonexistent/scheme.json", None, True),
        "folder": (folder, None, True),
        "endless device": ("/dev/zero", None, True),
        "empty device": ("/dev/null", None, True),
        "empty file": (empty, None, True),
        "unreadable": (unreadable, None, os.geteuid() != 0),  # root reads it anyway
        "stdin scheme": ("-", scheme_text, False),
        "stdin design": ("-", design_text, False),
        "stdin endless": ("-", b"[" * (65 * 1024 * 1024), True),
        "fifo": ("FIFO", design_text, False),
    }
    for name, (path, stdin, refuse) in kinds.items():
        means = "0,1,2" if stdin == scheme_text or path == unreadable else "0,1,2,3,4,5"
        for command in (["analyze"], ["export", "--format", "csv"], ["power", "--means", means, "--sd", "1"],
                        ["compare", "--with", "sum"], ["sheet", "--date", "2026-01-01", "-o", "-"]):
            if name == "stdin endless" and command[0] != "analyze":
                continue
            files = {empty: ""} if path == empty else {}
            if path == unreadable:
                files = {unreadable: scheme_text}
            cases.append(Case(f"path {name} ({command[0]})", command + ["--file", path], stdin=stdin, files=files,
                              refuse=refuse, place=path if refuse and path not in ("-", "FIFO") else None, kind="path"))
    data_paths = {"missing": "/nonexistent/d.csv", "folder": folder, "endless device": "/dev/zero", "empty device": "/dev/null"}
    for name, path in data_paths.items():
        cases.append(Case(f"fit data {name}", ["fit", "--levels", "a,b", "--scheme", "treatment", "--data", path,
                                               "--factor", "g", "--response", "y"], refuse=True, place=path, kind="path"))
    return cases


def data_cases(tmp):
    rows = {
        "no numeric response": "g,y\na,x\nb,y\na,z\nb,w\n",
        "million-character level": "g,y\na,1\nb,2\na,3\nb,4\n" + "c" * 1_000_000 + ",5\n",
        "million-character response": "g,y\na,1\nb,2\na,3\n" + "b," + "9" * 1_000_000 + "\n",
        "huge numbers": "g,y\na,1e308\nb,-1e308\na,1e308\nb,-1e308\n",
        "no rows": "g,y\n",
        "nul bytes": "g,y\na,1\x00\nb,2\n",
        "one column": "g\na\nb\n",
    }
    cases = []
    for name, text in rows.items():
        path = os.path.join(tmp, f"data-{len(cases)}.csv")
        cases.append(Case(f"fit {name}", ["fit", "--levels", "a,b", "--scheme", "treatment", "--data", path,
                                          "--factor", "g", "--response", "y"], files={path: text}, kind="data"))
    # The by-item analysis (--item beside --participant): hostile item columns.
    items = {
        "item column missing": ("p,w,g,y\np1,w1,a,1\np1,w1,b,2\n", "w2", True, "'w2'"),
        "empty item": ("p,w,g,y\np1,w1,a,1\np1, ,b,2\n", "w", True, "line 3"),
        "item at one level": ("p,w,g,y\np1,w1,a,1\np1,w2,b,2\np2,w1,b,3\np2,w1,a,4\np2,w2,b,5\n", "w", True, "'w2'"),
        "one item": ("p,w,g,y\np1,w1,a,1\np1,w1,b,2\np2,w1,a,3\np2,w1,b,5\n", "w", False, None),
    }
    for name, (text, column, refuse, place) in items.items():
        path = os.path.join(tmp, f"data-{len(cases)}.csv")
        for output in ([], ["--json"]):
            cases.append(Case(f"fit --item {name} {' '.join(output)}", ["fit", "--levels", "a,b", "--scheme", "treatment",
                                                                        "--within", "--data", path, "--factor", "g",
                                                                        "--response", "y", "--participant", "p", "--item",
                                                                        column] + output,
                              files={path: text}, refuse=refuse, place=place, kind="data"))
    return cases


def database_cases(tmp):
    """fit --database and export --format sql-summary: every kind of place, and the query's options at their extremes."""
    text_file = os.path.join(tmp, "not-a-database.db")
    fit = ["fit", "--levels", "a,b", "--scheme", "treatment", "--table", "t", "--factor", "g", "--response", "y"]
    places = {
        "missing sqlite file": ("sqlite:///nonexistent/d.db", "/nonexistent/d.db", {}),
        "sqlite folder": ("sqlite://" + tmp, tmp, {}),
        "sqlite endless device": ("sqlite:///dev/zero", "/dev/zero", {}),
        "sqlite empty device": ("sqlite:///dev/null", "/dev/null", {}),
        "sqlite text file": ("sqlite://" + text_file, text_file, {text_file: "g,y\na,1\n"}),
        "sqlite without a path": ("sqlite://", "--database", {}),
        "postgresql without a database": ("postgresql://u@127.0.0.1:1", "--database", {}),
        "postgresql with a password": ("postgresql://u:pw@127.0.0.1:1/d", "--database", {}),
        "postgresql bad port": ("postgresql://u@127.0.0.1:99999999/d", "--database", {}),
        "odbc without a source": ("odbc:", "--database", {}),
        "odbc with a password": ("odbc:Driver=x;PWD=secret", "--database", {}),
        "unknown scheme": ("mysql://h/d", "--database", {}),
        "empty": ("", "--database", {}),
    }
    cases = []
    for name, (url, place, files) in places.items():
        cases.append(Case(f"fit database {name}", fit[:1] + ["--database", url] + fit[1:], files=files, refuse=True,
                          place=place, kind="path"))
    query = ["export", "--format", "sql-summary", "--table", "t", "--factor", "g", "--response", "y"]
    for value in EXTREMES:
        cases.append(Case(f"export sql-summary --centre {value!r}", query + ["--centre", value], kind="option"))
        cases.append(Case(f"export sql-summary --variance {value!r}", query + ["--variance", value], refuse=True,
                          place="--variance", kind="option"))
    for value in ["", " ", 'x"; DROP TABLE t; --', "%1%2", "a" * 100_000]:
        cases.append(Case(f"export sql-summary --table {value[:30]!r}", query[:3] + ["--table", value] + query[5:],
                          refuse=value == "", place="--table" if value == "" else None, kind="option"))
    # The two-level form (one row per participant and level) is printed, not refused.
    cases.append(Case("export sql-summary --participant", query + ["--participant", "p"], refuse=False,
                      kind="option"))
    for value in ["", 'p"; DROP TABLE t; --']:
        cases.append(Case(f"export sql-summary --participant {value[:20]!r}", query + ["--participant", value],
                          refuse=value == "", place="--participant" if value == "" else None, kind="option"))
    cases.append(Case("export sql-summary without --table", query[:3] + query[5:], refuse=True, place="--table",
                      kind="option"))
    return cases


NON_FINITE = re.compile(rb"\b(nan|inf|infinity)\b", re.IGNORECASE)


def run(cli, case, tmp):
    for path, text in case.files.items():
        with open(path, "w", encoding="utf-8") as f:
            f.write(text)
        if path.endswith("unreadable.json"):
            os.chmod(path, 0)
    args = list(case.args)
    writer = None
    if "FIFO" in args:
        fifo = os.path.join(tmp, f"fifo-{threading.get_ident()}-{id(case)}")
        os.mkfifo(fifo)
        args[args.index("FIFO")] = fifo

        def feed():
            with open(fifo, "w", encoding="utf-8") as f:
                f.write(case.stdin)

        writer = threading.Thread(target=feed, daemon=True)
        writer.start()
        stdin = b""
    else:
        stdin = case.stdin.encode() if isinstance(case.stdin, str) else (case.stdin or b"")
    try:
        p = subprocess.run([cli] + args, input=stdin, capture_output=True, timeout=TIMEOUT)
    except subprocess.TimeoutExpired:
        return "hang: no answer within %d s" % TIMEOUT
    except BrokenPipeError:
        return None  # the command stopped reading early (at its limit), as it should
    finally:
        if writer:
            writer.join(1)
    err = p.stderr.decode("utf-8", "replace")
    if p.returncode < 0:
        return f"crash: signal {-p.returncode}: {err[-300:]}"
    if p.returncode not in (0, 2):
        return f"exit {p.returncode} (bad input must exit 2): {err[:300]}"
    if NON_FINITE.search(p.stdout):
        return "NaN or infinity in the output: " + NON_FINITE.search(p.stdout).group(0).decode()
    if p.returncode == 2:
        if not err.strip():
            return "exit 2 without a message"
        if len(err) > MAX_MESSAGE:
            return f"a message of {len(err)} characters"
        if case.place and case.place not in err:
            return f"the message does not name {case.place!r}: {err[:300]}"
        if not case.place and not re.search(r"--[a-z]|line \d|field '|standard input|/", err):
            return f"the message names no place: {err[:300]}"
    elif case.refuse:
        return "accepted in silence (expected a refusal with exit 2)"
    if case.accept and p.returncode != 0:
        return f"refused at a stated limit: {err[:300]}"
    return None


def main():
    cli = sys.argv[1]
    workers = 2
    if "--workers" in sys.argv:
        workers = int(sys.argv[sys.argv.index("--workers") + 1])
    with tempfile.TemporaryDirectory() as tmp:
        cases = file_cases(tmp) + option_cases() + path_cases(tmp) + data_cases(tmp) + database_cases(tmp) + limit_cases(tmp, cli)
        if "--list" in sys.argv:
            for c in cases:
                print(c.name)
            return 0
        with concurrent.futures.ThreadPoolExecutor(workers) as pool:
            results = list(pool.map(lambda c: (c, run(cli, c, tmp)), cases))
    failures = [(c, r) for c, r in results if r]
    for c, r in failures:
        print(f"FAIL {c.name}: {r}\n    {' '.join(c.args)[:300]}")
    print(f"{len(cases)} hostile inputs, {len(failures)} failed")
    return 1 if failures else 0


if __name__ == "__main__":
    sys.exit(main())
