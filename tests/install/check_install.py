#!/usr/bin/env python3
"""Install breathbeat into a temporary prefix, as a user would, and check what arrives:
the program runs, the man page lists every option every --help lists, bash completion
completes from the installed program, and `cpack` makes a .deb holding the same files.

usage: check_install.py BUILD_DIR BREATHBEAT
"""
import os
import re
import shutil
import subprocess
import sys
import tempfile

failures = []


def check(ok, what):
    if not ok:
        failures.append(what)
        print("FAIL:", what)


def run(*args, **kw):
    return subprocess.run(list(args), capture_output=True, text=True, **kw)


def commands(binary, path=()):
    """Every subcommand path, walked from --help (independently of scripts/make-manpage)."""
    text = run(binary, *path, "--help").stdout
    yield path, text
    if "Subcommands:" in text:
        for line in text.split("Subcommands:", 1)[1].splitlines():
            m = re.match(r"^  ([a-z][a-z-]*)\s", line)
            if m:
                yield from commands(binary, (*path, m.group(1)))


def options(help_text):
    found = set()
    for line in help_text.splitlines():
        m = re.match(r"^  (-\S+)", line)
        if m:
            found.update(o for o in m.group(1).split(",") if o.startswith("--"))
    return found


def main():
    build, binary = (os.path.abspath(a) for a in sys.argv[1:3])
    with tempfile.TemporaryDirectory() as tmp:
        prefix = os.path.join(tmp, "prefix")
        r = run("cmake", "--install", build, "--prefix", prefix)
        check(r.returncode == 0, "cmake --install: " + r.stderr)
        installed = os.path.join(prefix, "bin", "breathbeat")
        r = run(installed, "--version")
        check(r.returncode == 0 and "breathbeat" in r.stdout, "installed program runs --version")
        r = run(installed, "demo", cwd=tmp)
        check(r.returncode == 0 and "Cautions" in r.stdout, "installed program runs the demo")

        man = os.path.join(prefix, "share", "man", "man1", "breathbeat.1")
        check(os.path.isfile(man), "man page installed at share/man/man1/breathbeat.1")
        page = open(man, encoding="utf-8").read().replace("\\-", "-") if os.path.isfile(man) else ""
        for path, text in commands(installed):
            if path:
                check(".SS " + " ".join(path) in page, f"man page has a section for '{' '.join(path)}'")
            for opt in options(text):
                check(opt in page, f"man page lists {opt} of '{' '.join(path) or 'breathbeat'}'")

        completion = os.path.join(prefix, "share", "bash-completion", "completions", "breathbeat")
        check(os.path.isfile(completion), "bash completion installed")
        script = (f"source '{completion}'; PATH='{os.path.dirname(installed)}':$PATH; "
                  "COMP_WORDS=(breathbeat calc p); COMP_CWORD=2; _breathbeat; echo ${COMPREPLY[*]}; "
                  "COMP_WORDS=(breathbeat wave --fr); COMP_CWORD=2; _breathbeat; echo ${COMPREPLY[*]}")
        r = run("bash", "-c", script)
        lines = r.stdout.splitlines()
        check(len(lines) == 2 and lines[0].split() == ["ppv", "preload-test"],
              f"completion of 'calc p' gives ppv preload-test (got {lines[:1]})")
        check(len(lines) == 2 and lines[1].split() == ["--from"],
              f"completion of 'wave --fr' gives --from (got {lines[1:2]})")

        if shutil.which("cpack") and shutil.which("dpkg-deb"):
            out = os.path.join(tmp, "package")
            r = run("cpack", "-G", "DEB", "-B", out, "--config",
                    os.path.join(build, "CPackConfig.cmake"), cwd=build)
            check(r.returncode == 0, "cpack -G DEB: " + r.stdout[-2000:] + r.stderr[-2000:])
            debs = [f for f in os.listdir(out) if f.endswith(".deb")] if os.path.isdir(out) else []
            check(len(debs) == 1, f"one .deb made (got {debs})")
            if debs:
                listing = run("dpkg-deb", "-c", os.path.join(out, debs[0])).stdout
                for want in ("usr/bin/breathbeat", "usr/share/man/man1/breathbeat.1",
                             "bash-completion/completions/breathbeat"):
                    check(want in listing, f".deb holds {want}")
                fields = run("dpkg-deb", "-f", os.path.join(out, debs[0]), "Depends").stdout
                check("libedf" in fields, f".deb depends on libedf (Depends: {fields.strip()})")
        else:
            print("cpack or dpkg-deb not found: the package check was skipped")
    if failures:
        print(f"{len(failures)} check(s) failed")
        return 1
    print("install checks passed")
    return 0


if __name__ == "__main__":
    sys.exit(main())
