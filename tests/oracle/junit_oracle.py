"""junit_oracle.py - a JUnit XML report of plantsieve read back by Python's
xml.etree (an independent XML 1.0 parser) and checked.

  junit_oracle.py XML SCREEN_JSON   counts, names and verdicts against the
                                    screen's own JSON report of the same run
  junit_oracle.py XML --hostile     the strings of tests/unit/test_junit.c's
                                    hand-built run, character for character

The layout checked is the common practice of CI servers (no published
schema is available offline): <testsuites> holding <testsuite> elements with
tests/failures/errors/skipped counts, <testcase name classname> holding at
most one <failure> or <error> with message and type attributes."""
import json
import os
import sys
sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "e2e"))
import screen_doc  # noqa: E402
import xml.etree.ElementTree as ET


def fail(msg):
    print("junit_oracle: " + msg)
    sys.exit(1)


def check(cond, msg):
    if not cond:
        fail(msg)


def layout(path):
    root = ET.parse(path).getroot()
    check(root.tag == "testsuites", "root is %r" % root.tag)
    suites = root.findall("testsuite")
    check(len(suites) == 1, "%d testsuite elements" % len(suites))
    s = suites[0]
    cases = s.findall("testcase")
    failures = sum(len(c.findall("failure")) for c in cases)
    errors = sum(len(c.findall("error")) for c in cases)
    for c in cases:
        check(len(c.findall("failure")) + len(c.findall("error")) <= 1, "testcase %r: two outcomes" % c.get("name"))
        check(c.get("name") and c.get("classname") is not None, "testcase without name or classname")
    for el in (root, s):
        got = tuple(int(el.get(k)) for k in ("tests", "failures", "errors", "skipped"))
        check(got == (len(cases), failures, errors, 0),
              "%s counts %r, children %r" % (el.tag, got, (len(cases), failures, errors, 0)))
    props = {p.get("name"): p.get("value") for p in s.find("properties").findall("property")}
    check(props.get("caution", "").startswith("Caution: these floors are necessary conditions only."), "no caution")
    return s, cases


def against_screen(xml_path, json_path):
    s, cases = layout(xml_path)
    doc = screen_doc.load(json_path)  # the summary and its JSON Lines records
    per = doc["counts"]["per_verdict"]
    unread = [c for c in doc["catalogs"] if c["status"] == "failed"]
    plants = doc["plants"]
    check(sum(per.values()) == len(plants), "the screen's own counts disagree with its plants")
    check(int(s.get("tests")) == len(plants) + len(unread), "tests %s, screen %d + %d unread catalogs"
          % (s.get("tests"), len(plants), len(unread)))
    check(int(s.get("failures")) == per["redesign"] + per["not-stabilizable"], "failures")
    check(int(s.get("errors")) == per["needs-bandwidth"] + per["input-error"] + len(unread), "errors")
    for p, c in zip(plants, cases):
        name = p["id"] if p["id"] else "(no id, line %d)" % (p["error"]["line"] or p["source"]["line"])
        check(c.get("name") == name, "testcase %r, plant %r" % (c.get("name"), name))
        check(c.get("classname") == (p["source"]["file"] or ""), "classname of %r" % name)
        v = p["verdict"]
        f, e = c.find("failure"), c.find("error")
        if v in ("redesign", "not-stabilizable"):
            check(f is not None and f.get("type") == v and f.get("message") == (p["cause"] or ""),
                  "%r: failure of type %s with the cause" % (name, v))
        elif v in ("needs-bandwidth", "input-error"):
            check(e is not None and e.get("type") == v, "%r: error of type %s" % (name, v))
            if v == "input-error":
                check(e.get("message").startswith(p["error"]["message"]), "%r: error message" % name)
        else:
            check(f is None and e is None, "%r (%s) must pass" % (name, v))
            out = c.find("system-out").text
            check(out.startswith("verdict %s, rank %d" % (v, p["rank"])), "%r: system-out %r" % (name, out))
            if v == "marginal":
                check(p["cause"] in out, "%r: marginal cause in system-out" % name)
    rest = cases[len(plants):]
    check(len(rest) == len(unread), "%d catalog testcases for %d unread catalogs" % (len(rest), len(unread)))
    for c, cat in zip(rest, unread):
        e = c.find("error")
        check(c.get("classname") == cat["file"] and e is not None and e.get("type") == "catalog-unread",
              "unread catalog %r" % cat["file"])
        check(cat["error"]["message"] in e.get("message"), "unread catalog message")
    print("junit: %d testcases, %s failures, %s errors agree with %s" % (len(cases), s.get("failures"),
                                                                       s.get("errors"), json_path))


def hostile(xml_path):
    s, cases = layout(xml_path)
    names = [c.get("name") for c in cases]
    want = ["cause-\u00fc\u6f22\U0001d11e&<b>'x\"", "plain-\u00e9", "(no id, line 31)"]
    check(names == want, "names %r" % names)
    check([c.get("classname") for c in cases] == ["cat&<1>'\".yaml"] * 3, "classnames")
    f = cases[0].find("failure")
    cause = "pole \"x\" & <y> 'z' ]]> a\ufffdb\ufffdc\r\nline2\tend\ufffd\ufffd"  # one U+FFFD per byte of the cut sequence
    check(f.get("message") == cause, "failure message %r" % f.get("message"))
    check(f.get("type") == "not-stabilizable", "failure type")
    check(cause in f.text, "failure text %r" % f.text)
    check(cases[1].find("failure") is None and cases[1].find("error") is None, "clear plant fails")
    e = cases[2].find("error")
    check(e.get("type") == "input-error" and e.get("message") == "expected a number <1e3 & >0 (field 'gain')",
          "input error %r" % e.get("message"))
    print("junit: hostile strings survive escaping")


if len(sys.argv) == 3 and sys.argv[2] == "--hostile":
    hostile(sys.argv[1])
elif len(sys.argv) == 3:
    against_screen(sys.argv[1], sys.argv[2])
else:
    fail("usage: junit_oracle.py XML SCREEN_JSON | XML --hostile")
