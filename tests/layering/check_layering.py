#!/usr/bin/env python3
"""The layering check: no module includes a header of a module above its own.

The chain comes from one place, cmake/modules.txt (lowest module first), which the build also
reads. Every #include in include/freshet/<module>/ and src/<module>/ is checked:

- "freshet/<other>/..." must name <other> at or below <module> in the chain;
- a relative include ("../io/x.hpp") must not reach into a module above, nor into another
  module's src/ folder (those headers are private to their module);
- every folder include/freshet/<name>/ must be a module of the chain;
- docs/architecture.md's chain line must list the same modules in the same order.

Usage: check_layering.py ROOT      check the source tree at ROOT (exit 0 clean, 1 violations)
       check_layering.py --self-test   check that planted violations are found (exit 0 if so)
"""
import pathlib
import re
import sys
import tempfile

INCLUDE_RE = re.compile(r'^\s*#\s*include\s*([<"])([^>"]+)[>"]')
CHAIN_LINE_RE = re.compile(r'^\s*[a-z_]+(\s*<-\s*[a-z_]+)+\s*$')
SOURCE_SUFFIXES = {'.hpp', '.h', '.cpp', '.cc', '.in', '.ipp', '.tpp'}


def read_chain(root):
    path = root / 'cmake' / 'modules.txt'
    modules = []
    for line in path.read_text().splitlines():
        line = line.strip()
        if line and not line.startswith('#'):
            modules.append(line)
    return modules


def docs_chain(root):
    path = root / 'docs' / 'architecture.md'
    for number, line in enumerate(path.read_text().splitlines(), 1):
        if CHAIN_LINE_RE.match(line):
            return number, [name.strip() for name in line.split('<-')]
    return None, None


def module_of(path, root):
    """(module, 'include' | 'src') for a path inside include/freshet/<m>/ or src/<m>/."""
    try:
        rel = path.relative_to(root)
    except ValueError:
        return None, None
    parts = rel.parts
    if len(parts) >= 4 and parts[0] == 'include' and parts[1] == 'freshet':
        return parts[2], 'include'
    if len(parts) >= 3 and parts[0] == 'src':
        return parts[1], 'src'
    return None, None


def check_file(path, module, chain, root):
    rank = {name: i for i, name in enumerate(chain)}
    arrow = ' <- '.join(chain)
    problems = []
    rel = path.relative_to(root)
    for number, line in enumerate(path.read_text(errors='replace').splitlines(), 1):
        match = INCLUDE_RE.match(line)
        if not match:
            continue
        bracket, target = match.groups()
        where = f'{rel}:{number}: module {module} includes "{target}"'
        parts = target.split('/')
        if parts[0] == 'freshet' and len(parts) >= 3:
            other = parts[1]
            if other not in rank:
                problems.append(f'{where}: "{other}" is not a module in cmake/modules.txt')
            elif rank[other] > rank[module]:
                problems.append(f'{where}, a header of module {other}, which is above '
                                f'{module} in the chain {arrow}')
            continue
        if bracket != '"':
            continue
        resolved = (path.parent / target).resolve()
        if not resolved.exists():
            continue  # a generated header or a system header found through -I
        other, kind = module_of(resolved, root.resolve())
        if other is None or other == module:
            continue
        if other not in rank:
            problems.append(f'{where}: "{other}" is not a module in cmake/modules.txt')
        elif rank[other] > rank[module]:
            problems.append(f'{where}, a header of module {other}, which is above '
                            f'{module} in the chain {arrow}')
        elif kind == 'src':
            problems.append(f'{where}, a private header of module {other} (src/{other}/); '
                            f'move it to include/freshet/{other}/ if other modules need it')
    return problems


def check_tree(root):
    """Returns (problems, files checked)."""
    root = pathlib.Path(root)
    chain = read_chain(root)
    problems = []
    if len(set(chain)) != len(chain):
        problems.append(f'cmake/modules.txt names a module twice: {chain}')
    line, listed = docs_chain(root)
    if listed is None:
        problems.append('docs/architecture.md has no chain line (a <- b <- c)')
    elif listed != chain:
        problems.append(f'docs/architecture.md:{line}: chain {" <- ".join(listed)} differs '
                        f'from cmake/modules.txt: {" <- ".join(chain)}')
    include_root = root / 'include' / 'freshet'
    if include_root.is_dir():
        for folder in sorted(p for p in include_root.iterdir() if p.is_dir()):
            if folder.name not in chain:
                problems.append(f'include/freshet/{folder.name}/ is not a module in '
                                f'cmake/modules.txt')
    checked = 0
    for module in chain:
        for folder in (include_root / module, root / 'src' / module):
            if not folder.is_dir():
                continue
            for path in sorted(folder.rglob('*')):
                if path.is_file() and path.suffix in SOURCE_SUFFIXES:
                    checked += 1
                    problems += check_file(path, module, chain, root)
    return problems, checked


def report(root):
    problems, checked = check_tree(root)
    chain = ' <- '.join(read_chain(pathlib.Path(root)))
    for problem in problems:
        print(problem)
    if problems:
        print(f'layering check FAILED: {len(problems)} problem(s) in {checked} files; '
              f'modules depend one way: {chain} (cmake/modules.txt)')
        return 1
    print(f'layering check passed: {checked} files, no include of a module above its own '
          f'({chain})')
    return 0


def self_test():
    """Plants one violation of each kind in a small tree and requires the check to find each,
    and nothing in the clean files."""
    files = {
        'cmake/modules.txt': '# lowest first\ncore\nrouting\nio\n',
        'docs/architecture.md': '```\ncore <- routing <- io\n```\n',
        'include/freshet/core/a.hpp': '#pragma once\n',
        'include/freshet/routing/b.hpp': '#include "freshet/core/a.hpp"\n',
        'include/freshet/io/c.hpp': '#include <freshet/routing/b.hpp>\n',
        'src/routing/clean.cpp': '#include "freshet/routing/b.hpp"\n#include "local.hpp"\n',
        'src/routing/local.hpp': '#pragma once\n',
        'src/io/d.cpp': '#include "freshet/io/c.hpp"\n',
        # planted violations
        'src/core/up.cpp': '#include "freshet/routing/b.hpp"\n',
        'include/freshet/routing/up.hpp': '  #  include <freshet/io/c.hpp>\n',
        'src/core/relative.cpp': '#include "../routing/local.hpp"\n',
        'src/io/private.cpp': '#include "../routing/local.hpp"\n',
        'include/freshet/extra/e.hpp': '#pragma once\n',
    }
    expected = [
        'src/core/up.cpp:1: module core includes "freshet/routing/b.hpp"',
        'include/freshet/routing/up.hpp:1: module routing includes "freshet/io/c.hpp"',
        'src/core/relative.cpp:1: module core includes "../routing/local.hpp"',
        'src/io/private.cpp:1: module io includes "../routing/local.hpp", a private header',
        'include/freshet/extra/ is not a module',
    ]
    with tempfile.TemporaryDirectory() as tmp:
        root = pathlib.Path(tmp)
        for name, text in files.items():
            (root / name).parent.mkdir(parents=True, exist_ok=True)
            (root / name).write_text(text)
        problems, _ = check_tree(root)
        failures = [e for e in expected if not any(p.startswith(e) for p in problems)]
        if len(problems) != len(expected):
            failures.append(f'expected {len(expected)} problems, found {len(problems)}: '
                            f'{problems}')
        # A docs chain that disagrees with cmake/modules.txt is found too.
        (root / 'docs/architecture.md').write_text('core <- io <- routing\n')
        problems, _ = check_tree(root)
        if not any(p.startswith('docs/architecture.md:1: chain') for p in problems):
            failures.append('a docs chain line differing from cmake/modules.txt was not found')
    for failure in failures:
        print('self-test: not found:', failure)
    print('layering self-test', 'FAILED' if failures else 'passed: every planted problem found')
    return 1 if failures else 0


if __name__ == '__main__':
    if len(sys.argv) == 2 and sys.argv[1] == '--self-test':
        sys.exit(self_test())
    if len(sys.argv) != 2:
        sys.exit(__doc__)
    sys.exit(report(sys.argv[1]))
