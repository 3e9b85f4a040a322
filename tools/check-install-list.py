#!/usr/bin/python3
"""The fresh-machine guard: every Debian package that the build and the tests read must be in the
install list of tools/dev.sh or in what that list pulls in (its recursive Depends and PreDepends,
without Recommends or Suggests, as a fresh machine installs it with --no-install-recommends).

It collects the files the builds really used and finds the package that owns each:
  - the CMake package files that configure found (the *_DIR entries of CMakeCache.txt),
  - the tools the build and the tests run (compiler, linker, generator, CTest, Python),
  - every header the compiler read (`ninja -t deps`),
  - every shared library the built programs and tests load (`ldd`), and the Qt plugins they load
    at run time (the offscreen platform, the SVG icon engine),
  - the Python modules that tests/python/*.py import.
A package that owns such a file but is neither in the list nor pulled in by it is named, with the
file that needed it, and the check fails. So does a file outside the source and build trees that
no Debian package owns (something installed by hand).

Usage: check-install-list.py BUILD_DIR [BUILD_DIR ...] [--drop PACKAGE ...]
  --drop PACKAGE   check as if PACKAGE were left out of the list (the self-test uses it).
Exit status: 0 all covered, 1 something is missing, 2 bad usage.
"""
import ast
import glob
import os
import re
import shutil
import subprocess
import sys

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
PYTHON = '/usr/bin/python3'


def install_list():
    out = subprocess.run(['bash', os.path.join(ROOT, 'tools', 'dev.sh'), 'packages'],
                         check=True, capture_output=True, text=True).stdout
    return [p for p in out.split() if p]


def closure(packages):
    """The packages that installing PACKAGES installs: recursive Depends/PreDepends."""
    if not packages:
        return set()
    cmd = ['apt-cache', 'depends', '--recurse', '--no-recommends', '--no-suggests', '--no-conflicts',
           '--no-breaks', '--no-replaces', '--no-enhances'] + packages
    out = subprocess.run(cmd, capture_output=True, text=True)
    if out.returncode != 0:
        sys.exit(f'check-install-list: apt-cache depends failed: {out.stderr.strip()}')
    names = set(packages)
    for line in out.stdout.splitlines():
        s = line.strip()
        if not s:
            continue
        m = re.match(r'^\|?(?:Pre)?Depends: (.+)$', s)
        name = m.group(1) if m else s
        name = name.strip('<>').split(':')[0]
        if re.match(r'^[a-z0-9][a-z0-9+.-]+$', name):
            names.add(name)
    return names


def dpkg_owners():
    """Map every path that an installed package lists to its packages."""
    owners = {}
    for lst in glob.glob('/var/lib/dpkg/info/*.list'):
        pkg = os.path.basename(lst)[:-5].split(':')[0]
        with open(lst, encoding='utf-8', errors='replace') as f:
            for path in f:
                owners.setdefault(path.rstrip('\n'), set()).add(pkg)
    # Diverted files and usrmerge: /lib is /usr/lib on Debian 12.
    return owners


def owner_of(path, owners):
    candidates = [path, os.path.realpath(path)]
    for p in list(candidates):
        if p.startswith('/usr/lib/') or p.startswith('/usr/bin/') or p.startswith('/usr/sbin/'):
            candidates.append(p[4:])
        elif p.startswith('/lib/') or p.startswith('/bin/') or p.startswith('/sbin/') or p.startswith('/lib64/'):
            candidates.append('/usr' + p)
    for p in candidates:
        if p in owners:
            return owners[p]
    return None


def cmake_cache(build):
    cache = {}
    with open(os.path.join(build, 'CMakeCache.txt'), encoding='utf-8') as f:
        for line in f:
            m = re.match(r'^([A-Za-z0-9_.+-]+):[A-Z]+=(.*)$', line.rstrip('\n'))
            if m:
                cache[m.group(1)] = m.group(2)
    return cache


def used_files(build):
    """(path, why) pairs for every outside file that BUILD used."""
    files = []
    cache = cmake_cache(build)
    # CMake package files found at configure time.
    for key, value in cache.items():
        if key.endswith('_DIR') and value.startswith('/') and os.path.isdir(value):
            for cfg in glob.glob(os.path.join(value, '*onfig.cmake')) + glob.glob(os.path.join(value, '*-config.cmake')):
                files.append((cfg, f'{key} in {build}/CMakeCache.txt'))
    # The tools the build and the tests run. (CMAKE_LINKER is left out: CMake links through the
    # compiler driver, which runs binutils' ld, and never calls the linker it records.)
    for key in ('CMAKE_CXX_COMPILER', 'CMAKE_MAKE_PROGRAM', 'CMAKE_COMMAND', 'CMAKE_CTEST_COMMAND', 'CMAKE_AR',
                'CMAKE_RANLIB', 'PKG_CONFIG_EXECUTABLE', 'CB_PYTHON'):
        value = cache.get(key, '')
        if value.startswith('/') and os.path.exists(value):
            files.append((value, f'{key} in {build}/CMakeCache.txt'))
    # Every header the compiler read.
    ninja = cache.get('CMAKE_MAKE_PROGRAM') or shutil.which('ninja')
    deps = subprocess.run([ninja, '-C', build, '-t', 'deps'], capture_output=True, text=True).stdout
    target = ''
    for line in deps.splitlines():
        if line and not line.startswith(' '):
            target = line.split(':')[0]
        elif line.startswith('    /'):
            files.append((line.strip(), f'compiling {target}'))
    # Every shared library the built programs load, and the Qt plugins they load at run time.
    for exe in built_programs(build):
        out = subprocess.run(['ldd', exe], capture_output=True, text=True).stdout
        for m in re.finditer(r'=> (/\S+)|^\s+(/\S+) \(', out, re.M):
            files.append((m.group(1) or m.group(2), f'loaded by {os.path.relpath(exe, build)}'))
    qtcore = [p for p, _ in files if 'libQt6Core.so' in p]
    if qtcore and os.path.exists(os.path.join(build, 'ui')):
        plugins = os.path.join(os.path.dirname(os.path.realpath(qtcore[0])), 'qt6', 'plugins')
        for plugin in ('platforms/libqoffscreen.so', 'iconengines/libqsvgicon.so', 'imageformats/libqsvg.so'):
            files.append((os.path.join(plugins, plugin), 'a Qt plugin the window loads'))
    return files


def built_programs(build):
    for dirpath, _, names in os.walk(build):
        if 'CMakeFiles' in dirpath:
            continue
        for n in names:
            p = os.path.join(dirpath, n)
            if os.access(p, os.X_OK) and not os.path.islink(p):
                with open(p, 'rb') as f:
                    if f.read(4) == b'\x7fELF':
                        yield p


def python_files():
    files = [(PYTHON, 'the interpreter of tests/python')]
    modules = set()
    for script in glob.glob(os.path.join(ROOT, 'tests', 'python', '*.py')):
        tree = ast.parse(open(script, encoding='utf-8').read())
        for node in ast.walk(tree):
            if isinstance(node, ast.Import):
                modules.update(a.name.split('.')[0] for a in node.names)
            elif isinstance(node, ast.ImportFrom) and node.module and node.level == 0:
                modules.add(node.module.split('.')[0])
    code = ('import importlib, sys\n'
            'for m in sys.argv[1:]:\n'
            '    f = getattr(importlib.import_module(m), "__file__", None)\n'
            '    print(m, f or "")\n')
    out = subprocess.run([PYTHON, '-c', code] + sorted(modules), capture_output=True, text=True)
    if out.returncode != 0:
        files.append(('(python module)', f'tests/python imports a module that {PYTHON} lacks: {out.stderr.strip()}'))
    for line in out.stdout.splitlines():
        name, _, path = line.partition(' ')
        if path:
            files.append((path, f'import {name} in tests/python'))
    return files


def main(argv):
    drop = []
    builds = []
    it = iter(argv)
    for a in it:
        if a == '--drop':
            drop.append(next(it, ''))
        elif a.startswith('-'):
            print(__doc__)
            return 2
        else:
            builds.append(a)
    builds = [b for b in builds if os.path.exists(os.path.join(b, 'CMakeCache.txt'))]
    if not builds:
        print('check-install-list: no configured build directory given', file=sys.stderr)
        return 2
    listed = [p for p in install_list() if p not in drop]
    allowed = closure(listed)
    owners = dpkg_owners()
    inside = [os.path.realpath(ROOT)] + [os.path.realpath(b) for b in builds]
    files = []
    for b in builds:
        files += used_files(b)
    files += python_files()
    missing = {}   # package -> first file that needed it
    unowned = {}
    for path, why in files:
        if path == '(python module)':
            unowned.setdefault(why, why)
            continue
        real = os.path.realpath(path)
        if any(real == d or real.startswith(d + os.sep) for d in inside):
            continue
        pkgs = owner_of(path, owners)
        if pkgs is None:
            unowned.setdefault(path, why)
            continue
        if not pkgs & allowed:
            missing.setdefault(sorted(pkgs)[0], (path, why))
    checked = len({p for p, _ in files})
    for pkg, (path, why) in sorted(missing.items()):
        print(f'missing from the install list (tools/dev.sh): {pkg}, which owns {path} ({why})')
    for path, why in sorted(unowned.items()):
        print(f'not from any Debian package: {path} ({why})')
    if missing or unowned:
        print(f'check-install-list: {len(missing)} package(s) missing, {len(unowned)} file(s) from no package '
              f'({checked} files checked in {", ".join(builds)})')
        return 1
    print(f'check-install-list: every one of {checked} files the builds and tests used comes from the install list '
          f'or its dependencies ({len(listed)} packages listed, {len(allowed)} with dependencies)')
    return 0


if __name__ == '__main__':
    sys.exit(main(sys.argv[1:]))
