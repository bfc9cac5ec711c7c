#!/usr/bin/env python3
"""make_hostile.py - writes the hand-made hostile files of the regression
corpus (tests/fuzz/corpus/<fuzzer>/hostile-*). Rerun after changing it;
files found by the fuzzers sit beside these under their libFuzzer names."""
import os
import sys

here = os.path.dirname(os.path.abspath(__file__))
corpus = os.path.join(here, "corpus")

LONG = 1_100_000  # past PS_FIELD_MAX_BYTES (1 MiB): one scalar / CSV cell
DEEP = 10_000     # nesting levels (the reader's limit is 32)


def put(fuzzer, name, data):
    if isinstance(data, str):
        data = data.encode("utf-8")
    path = os.path.join(corpus, fuzzer, "hostile-" + name)
    os.makedirs(os.path.dirname(path), exist_ok=True)
    with open(path, "wb") as f:
        f.write(data)


def put_seed(fuzzer, name, data):
    path = os.path.join(corpus, fuzzer, name)
    os.makedirs(os.path.dirname(path), exist_ok=True)
    with open(path, "wb") as f:
        f.write(data)


def yaml_files():
    """Catalogs for both YAML-reading fuzzers (reader alone, whole screen)."""
    bomb = ["a0: &a0 [x, x, x, x, x, x, x, x, x, x]"]
    for i in range(1, 10):
        prev = f"*a{i-1}"
        bomb.append(f"a{i}: &a{i} [{', '.join([prev] * 10)}]")
    bomb.append("plants:\n  - id: bomb\n    poles: *a9\n    gain: 2.385\n")
    plant = "  - id: {id}\n    poles: [{poles}]\n    gain: 2.385\n"
    return {
        "alias-bomb.yaml": "\n".join(bomb),
        "deep-flow.yaml": "plants: " + "[" * DEEP + "]" * DEEP + "\n",
        "deep-block.yaml": "plants:\n  " + "- " * DEEP + "x\n",
        "deep-family.yaml": "families:\n  - id: f\n    parameters: " + "{a: " * DEEP + "1" + "}" * DEEP + "\n",
        "long-line.yaml": "plants:\n  - id: " + "q" * LONG + "\n    poles: [-2.385]\n    gain: 1.7\n",
        "long-number.yaml": "plants:\n  - id: n\n    poles: [-" + "3" * LONG + "]\n    gain: 1.7\n",
        "invalid-utf8.yaml": b"plants:\n  - id: caf\xc3\x28-\xff\xfe\n    poles: [-2.385]\n    gain: 1.7\n",
        "underflow.yaml": "plants:\n  - id: tiny\n    poles: [1e-400, -3.31]\n    delay: 1e-400\n    gain: 1.7\n",
        "control-chars.yaml": "plants:\n  - id: \"bell\\a\\x1b[31mred\\x7f\"\n    poles: [-2.385]\n    gain: 1.7\n",
        "huge-delay.yaml": "plants:\n  - id: overflow-delay\n    poles: [1, -7.31]\n    delay: 1000\n    gain: 2.385\n",
        "huge-pole.yaml": "plants:\n  - id: fast-pole\n    poles: [1e8, -7.31]\n    gain: 2.385\n    band_edge: 3.7\n",
        "cancellation.yaml": "plants:\n  - id: cancel\n    zeros: [4.13]\n    poles: [4.13, -7.31]\n    gain: 2.385\n",
        "empty.yaml": "",
        "nul-bytes.yaml": b"plants:\n  - id: n\x00ul\n    poles: [-2.385]\n",
        "big-family.yaml": ("families:\n  - id: wide\n    parameters:\n"
                            "      k: {nominal: 3, sweep: {from: 1, to: 9, count: 100000}}\n"
                            "      m: {nominal: 3, sweep: {from: 1, to: 9, count: 100000}}\n"
                            "    poles: [\"k\", -60]\n    gain: \"m\"\n"
                            "    yield: {samples: 100000000, seed: 7}\n"),
    }


def csv_files():
    head = "id,poles,gain,delay\n"
    return {
        "short-row.csv": head + "a,-2.385,1.7,0.01\nb,-3.31\n",
        "long-row.csv": head + "c,-2.385,1.7," + "9" * 10 + ",extra,cells\n",
        "long-line.csv": head + "q" * LONG + ",-2.385,1.7,0\n",
        "invalid-utf8.csv": head.encode() + b"caf\xc3\x28\xff,-2.385,1.7,0\n",
        "underflow.csv": head + "tiny,1e-400 -3.31,1.7,1e-400\n",
        "control-chars.csv": head + "\"bell\a\x1b[31mred\x7f\",-2.385,1.7,0\n",
        "formula.csv": head + "=HYPERLINK(\"x\"),-2.385,1.7,0\n+1,-2.385,1.7,0\n@sum,-3.31,1.7,0\n",
        "unterminated.csv": head + "\"open,-2.385,1.7,0\n",
        "header-only.csv": head,
        "empty.csv": "",
        "crlf-bare-cr.csv": "id,poles,gain\r\na,-2.385,1.7\rb,-3.31,1.7\r\n",
        "duplicate-header.csv": "id,poles,poles,gain\na,-2.385,-3.31,1.7\n",
        "nul-bytes.csv": b"id,poles,gain\nn\x00ul,-2.385,1.7\n",
    }


def expr_files():
    return {
        "deep-parens": "M g\n" + "(" * DEEP + "M" + ")" * DEEP,
        "long-text": "M\n" + "+".join(["M"] * 2000),
        "invalid-utf8": b"M\nM + \xc3\x28 * \xff",
        "underflow": "M\nM * 1e-400",
        "overflow-const": "M\nM + exp(1000)",
        "divide-zero": "M m\n1/(1/(M-m))",
        "control-chars": "M\nM\a + \x1b[31m1",
        "bad-names": "sin _pi 1x M M\nM",
        "assignment": "M\nM = 3",
        "multiple-results": "M g\nM, g",
        "empty": "",
        "long-name": "M" * 70 + "\nM",
        "ternary-chain": "x\n" + "x>0?" * 300 + "1" + ":0" * 300,
    }


def main():
    ys = yaml_files()
    for name, data in ys.items():
        put("yaml", name, data)
        put("screen", name, data)
    for name, data in csv_files().items():
        put("csv", name, data)
        put("screen", name, data)
    for name, data in expr_files().items():
        put("expr", name, data)
    # Seeds: the project's own catalogs (readers and screen) and family
    # expressions, so that fuzzing starts from inputs that get far.
    root = os.path.dirname(os.path.dirname(here))
    seeds = ["catalogs/demo-variants.yaml", "catalogs/demo-variants.csv",
             "catalogs/broken/broken-entries.yaml", "catalogs/broken/broken-rows.csv",
             "tests/data/e2e/families.yaml", "tests/data/e2e/bad-families.yaml",
             "tests/data/yaml/three_forms.yaml", "tests/data/csv/three_forms.csv"]
    for rel in seeds:
        with open(os.path.join(root, rel), "rb") as f:
            data = f.read()
        name = "seed-" + os.path.basename(rel)
        put_seed("screen", name, data)
        put_seed("yaml" if rel.endswith(".yaml") else "csv", name, data)
    for i, text in enumerate(["M m g l\n-(M+m)*g/(M*l)", "gap g\nsqrt(2*g/gap)",
                              "k p\nk/((p+60)*p) + min(k, 2, p)^2", "x\nx>0.5 ? log10(x) : -x"]):
        put_seed("expr", f"seed-{i}", text.encode())
    return 0


if __name__ == "__main__":
    sys.exit(main())
