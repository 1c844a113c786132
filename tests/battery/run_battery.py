#!/usr/bin/env python3
"""The bad-input battery: runs every case of cases.txt against the real freshet executable.

Each case copies the base study (base/), changes it in one place, runs `freshet check` and/or
`freshet route` (or a command of its own) in a scratch folder, and asserts:
  - the exit code;
  - every regex of the case matches a line of the output (stdout and stderr together); a case
    that expects bad input (exit 2) must locate it: one of its regexes uses {line} or {loc};
  - nothing is left behind: after a failed command the case folder (study files and output
    folder) is exactly as it was before the command ran: no result file under a final name,
    no staging folder, no temporary or lock file. After a run that succeeds, the result set is
    complete (every storm's summary JSON) and nothing hidden is left.
The format of cases.txt is described at its top. Standard library only.

usage: run_battery.py --freshet EXE [--cases FILE] [--base DIR] [--scratch DIR] [--jobs N]
                      [--only REGEX] [--keep]
"""

import argparse
import concurrent.futures
import hashlib
import os
import re
import shlex
import shutil
import stat
import subprocess
import sys
import time

HERE = os.path.dirname(os.path.abspath(__file__))
STUDY = "basin.toml"
RUN_TIMEOUT_S = 60


class CaseError(Exception):
    """A mistake in the table itself (an edit that does not apply, a bad line)."""


class Case:
    def __init__(self, number, case_id, klass, run, exit_code, edits, regexes, xfail, defect):
        self.number = number  # line in cases.txt
        self.id = case_id
        self.klass = klass
        self.run = run
        self.exit_code = exit_code
        self.edits = edits
        self.regexes = regexes
        self.xfail = xfail
        self.defect = defect


def unescape(text):
    """'\\n' is a line break, '\\t' a tab and '\\xHH' the byte HH (files are edited as
    Latin-1, so every byte stands for itself)."""
    text = text.replace("\\n", "\n").replace("\\t", "\t")
    return re.sub(r"\\x([0-9a-fA-F]{2})", lambda m: chr(int(m.group(1), 16)), text)


def parse_cases(path):
    cases, seen = [], set()
    comments = []  # the comment lines just above a case
    with open(path, encoding="utf-8") as f:
        for number, raw in enumerate(f, start=1):
            line = raw.rstrip("\n")
            if not line.strip():
                comments = []
                continue
            if line.lstrip().startswith("#"):
                comments.append(line.strip().lstrip("#").strip())
                continue
            block = " ".join(comments)
            comments = []
            defect = block[block.find("known defect:"):] if "known defect:" in block else ""
            fields = [x.strip() for x in line.split(" | ")]
            if len(fields) < 5:
                raise CaseError(f"{path}:{number}: fewer than 5 fields separated by ' | '")
            case_id, klass, run, exit_text, edits = fields[:5]
            regexes = fields[5:]
            xfail = run.endswith("(xfail)")
            if xfail:
                run = run[: -len("(xfail)")].strip()
                if not defect:
                    raise CaseError(f"{path}:{number}: an (xfail) case needs a '# known defect: ...'"
                                    " comment just above it")
            if case_id in seen:
                raise CaseError(f"{path}:{number}: case id '{case_id}' is used twice")
            seen.add(case_id)
            try:
                exit_code = int(exit_text)
            except ValueError:
                raise CaseError(f"{path}:{number}: exit code '{exit_text}' is not a number")
            if exit_code == 2 and klass not in ("cli", "output") and not any("{line" in r or "{loc" in r for r in regexes):
                raise CaseError(f"{path}:{number}: a bad-input case (exit 2) must assert the "
                                "location: use {loc} or {line} in a regex (groups cli and "
                                "output excepted)")
            cases.append(Case(number, case_id, klass, run, exit_code,
                              [e.strip() for e in edits.split(" && ")] if edits != "-" else [],
                              regexes, xfail, defect[len("known defect:"):].strip()))
    return cases


def line_of(text, offset):
    return text.count("\n", 0, offset) + 1


def apply_edit(folder, edit, anchors):
    """Applies one edit in the case folder; returns (file, line) of the change."""
    name = STUDY
    if edit.startswith("@"):
        name, _, edit = edit[1:].partition(" ")
    path = os.path.join(folder, name)
    if edit.startswith("! "):  # a shell command in the case folder (output folder set-ups)
        subprocess.run(edit[2:], shell=True, cwd=folder, check=True)
        return None
    text = open(path, encoding="latin-1").read() if os.path.exists(path) else ""
    if edit == ":=" or edit.startswith(":= "):  # the whole file
        new = unescape(edit[3:])
        where = 1
    elif edit.startswith("+ "):  # append
        if text and not text.endswith("\n"):
            text += "\n"
        where = line_of(text, len(text)) if text else 1
        new = text + unescape(edit[2:]) + "\n"
    elif edit.startswith("- "):  # delete the one line holding the text
        old = unescape(edit[2:])
        if text.count(old) != 1:
            raise CaseError(f"'{old}' occurs {text.count(old)} times in {name}, not once")
        at = text.index(old)
        start = text.rfind("\n", 0, at) + 1
        end = text.find("\n", at)
        end = len(text) if end < 0 else end + 1
        where = line_of(text, start)
        new = text[:start] + text[end:]
    elif " => " in edit or edit.endswith(" =>"):
        old, _, repl = edit.partition(" =>")
        old = unescape(old)
        repl = unescape(repl[1:] if repl.startswith(" ") else repl)
        if text.count(old) != 1:
            raise CaseError(f"'{old}' occurs {text.count(old)} times in {name}, not once")
        at = text.index(old)
        where = line_of(text, at)
        new = text.replace(old, repl)
    else:
        raise CaseError(f"edit '{edit}' is not one of 'OLD => NEW', '+ TEXT', '- TEXT', "
                        "':= TEXT', '! COMMAND'")
    with open(path, "w", encoding="latin-1") as f:
        f.write(new)
    anchors.setdefault("file", name)
    anchors.setdefault("line", where)
    return name, where


def expand(regex, folder, anchors):
    """Replaces {loc}, {loc:TEXT}, {line}, {line:TEXT} and {dir} in a regex."""
    def line_holding(text_to_find):
        """(file, line) of the one line holding the text: in the first edited file, else in
        the basin file."""
        for name in dict.fromkeys([anchors.get("file", STUDY), STUDY]):
            lines = open(os.path.join(folder, name), encoding="latin-1").read().split("\n")
            hits = [i + 1 for i, line in enumerate(lines) if text_to_find in line]
            if len(hits) > 1:
                raise CaseError(f"'{text_to_find}' is on {len(hits)} lines of {name}, not one")
            if hits:
                return name, hits[0]
        raise CaseError(f"'{text_to_find}' is on no line of the edited files")

    def place(m):
        if m.group(1):
            return line_holding(m.group(1))
        return anchors.get("file", STUDY), anchors.get("line", 0)

    def line(m):
        return str(place(m)[1])

    def loc(m):
        name, number = place(m)
        return f"{re.escape(name)}:{number}:(\\d+:)?"

    regex = re.sub(r"\{loc(?::([^}]*))?\}", loc, regex)
    regex = re.sub(r"\{line(?::([^}]*))?\}", line, regex)
    return regex.replace("{dir}", re.escape(folder))


def snapshot(folder):
    """Every path under the folder with its kind, mode and content digest."""
    state = {}
    for root, dirs, files in os.walk(folder):
        for name in dirs + files:
            path = os.path.join(root, name)
            rel = os.path.relpath(path, folder)
            st = os.lstat(path)
            if stat.S_ISREG(st.st_mode):
                with open(path, "rb") as f:
                    state[rel] = ("file", hashlib.sha256(f.read()).hexdigest())
            else:
                state[rel] = ("dir" if stat.S_ISDIR(st.st_mode) else "other", "")
    return state


def commands(case, freshet):
    study, out = STUDY, "out"
    route = [freshet, "route", study, "--out", out, "--quiet"]
    if case.run == "check":
        return [[freshet, "check", study]]
    if case.run == "route":
        return [route]
    if case.run == "both":
        return [[freshet, "check", study], route]
    if case.run == "compare":
        return [[freshet, "compare", study, "--out", out, "--quiet"]]
    if case.run.startswith("$ "):
        return [[freshet] + shlex.split(case.run[2:])]
    if case.run.startswith("sh: "):
        return [["sh", "-c", case.run[4:].replace("{freshet}", shlex.quote(freshet))]]
    raise CaseError(f"run '{case.run}' is not check, route, both, compare, '$ ARGS' or 'sh: ...'")


def run_case(case, freshet, base, scratch, show=False):
    """Returns a list of failure descriptions (empty when the case passes)."""
    folder = os.path.join(scratch, case.id)
    shutil.rmtree(folder, ignore_errors=True)
    shutil.copytree(base, folder)
    anchors = {}
    for edit in case.edits:
        apply_edit(folder, edit, anchors)
    regexes = [expand(r, folder, anchors) for r in case.regexes]
    failures = []
    for cmd in commands(case, freshet):
        before = snapshot(folder)
        try:
            proc = subprocess.run(cmd, cwd=folder, stdout=subprocess.PIPE,
                                  stderr=subprocess.STDOUT, timeout=RUN_TIMEOUT_S)
            output = proc.stdout.decode("utf-8", "replace")
            code = proc.returncode
        except subprocess.TimeoutExpired as e:
            output = (e.stdout or b"").decode("utf-8", "replace")
            code = f"timeout after {RUN_TIMEOUT_S} s"
        shown = " ".join(shlex.quote(os.path.basename(c) if c == freshet else c) for c in cmd)
        problems = []
        if show:
            print(f"---- {case.id}: $ {shown} -> {code}\n{output}", end="", flush=True)
        if code != case.exit_code:
            problems.append(f"exit code {code}, expected {case.exit_code}")
        if isinstance(code, int) and code < 0:
            problems.append(f"killed by signal {-code}")
        lines = output.splitlines()
        for regex in regexes:
            if not any(re.search(regex, line) for line in lines):
                problems.append(f"no line of the output matches: {regex}")
        after = snapshot(folder)
        if case.exit_code != 0 or code != 0:
            changed = sorted(p for p in set(before) | set(after) if before.get(p) != after.get(p))
            if changed:
                problems.append("the failed command left or changed: " + ", ".join(changed))
        else:
            hidden = sorted(p for p in after if os.path.basename(p).startswith(".")
                            and p not in before)
            if hidden:
                problems.append("the run left hidden files: " + ", ".join(hidden))
            # A result set is complete when its summary JSON, renamed last, stands beside it.
            orphans = sorted(p for p in after if p.endswith(".nc") and p not in before
                             and not p.endswith(("_subcatchments.nc", "_profiles.nc"))
                             and p[:-3] + "_summary.json" not in after)
            if orphans:
                problems.append("results without their summary JSON: " + ", ".join(orphans))
        if problems:
            failures.append(f"$ {shown}\n    " + "\n    ".join(problems) + "\n  output:\n"
                            + "\n".join("    | " + line for line in lines[:40]))
    return failures


def main():
    parser = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    parser.add_argument("--freshet", required=True)
    parser.add_argument("--cases", default=os.path.join(HERE, "cases.txt"))
    parser.add_argument("--base", default=os.path.join(HERE, "base"))
    parser.add_argument("--scratch", default=os.path.join(os.getcwd(), "battery-scratch"))
    parser.add_argument("--jobs", type=int, default=2)
    parser.add_argument("--only", help="run the cases whose id matches this regex")
    parser.add_argument("--keep", action="store_true", help="keep the case folders")
    parser.add_argument("--show", action="store_true", help="print every command's output")
    args = parser.parse_args()
    freshet = os.path.abspath(args.freshet)
    try:
        cases = parse_cases(args.cases)
    except CaseError as e:
        print(f"battery: {e}")
        return 1
    if args.only:
        cases = [c for c in cases if re.search(args.only, c.id)]
    shutil.rmtree(args.scratch, ignore_errors=True)
    os.makedirs(args.scratch)
    started = time.monotonic()

    def one(case):
        try:
            return case, run_case(case, freshet, args.base, args.scratch, args.show), None
        except CaseError as e:
            return case, None, str(e)

    results = {}
    with concurrent.futures.ThreadPoolExecutor(max_workers=max(1, args.jobs)) as pool:
        for case, failures, error in pool.map(one, cases):
            results[case.id] = (failures, error)
    counts = {"passed": 0, "xfail": 0, "failed": 0, "xpass": 0, "broken": 0}
    per_class = {}
    for case in cases:
        failures, error = results[case.id]
        where = f"cases.txt:{case.number}"
        if error:
            verdict = "broken"
            print(f"BROKEN  {case.id} ({where}): the case cannot be set up: {error}")
        elif failures and case.xfail:
            verdict = "xfail"
            print(f"xfail   {case.id} (known defect: {case.defect})")
        elif failures:
            verdict = "failed"
            print(f"FAIL    {case.id} ({where}, class {case.klass})")
            for f in failures:
                print("  " + f)
        elif case.xfail:
            verdict = "xpass"
            print(f"XPASS   {case.id} ({where}): marked as a known defect but passes; "
                  "remove the (xfail) mark")
        else:
            verdict = "passed"
            print(f"ok      {case.id}")
        counts[verdict] += 1
        tally = per_class.setdefault(case.klass, {"cases": 0, "passed": 0, "xfail": 0})
        tally["cases"] += 1
        if verdict in tally:
            tally[verdict] += 1
    if not args.keep and counts["failed"] + counts["broken"] + counts["xpass"] == 0:
        shutil.rmtree(args.scratch, ignore_errors=True)
    classes = ", ".join(f"{k} {v['passed']}/{v['cases']}" + (f" ({v['xfail']} xfail)"
                                                             if v["xfail"] else "")
                        for k, v in per_class.items())
    print(f"battery: {len(cases)} cases in {len(per_class)} groups: {counts['passed']} passed, "
          f"{counts['xfail']} expected failures (known defects), {counts['failed']} failed, "
          f"{counts['xpass']} unexpectedly passed, {counts['broken']} broken; "
          f"{time.monotonic() - started:.1f} s")
    print(f"battery: per group (passed/cases): {classes}")
    return 0 if counts["failed"] + counts["xpass"] + counts["broken"] == 0 else 1


if __name__ == "__main__":
    sys.exit(main())
