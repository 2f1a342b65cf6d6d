#!/usr/bin/env python3
"""Installs lidbox into a temporary prefix and uses it the way a user and a consumer project do.

1. `cmake --install <build dir> --prefix P` puts the binary, the headers, the rule sets under
   P/share/lidbox/ and the CMake package in place.
2. A consumer project of its own (CMakeLists.txt + main.cpp) finds it with find_package(lidbox),
   links lidbox::lidbox, builds with the build's own generator, compiler and flags, and prints a
   parsed time and a unit conversion, checked against Python's calendar module and the
   definition of the international foot.
3. The INSTALLED binary runs a copy of the demo in a folder outside the checkout, with no LIDBOX_*
   variable set: exit 0, the shipped rule sets found in P/share/lidbox/rules and named in the
   reports by their place in lidbox's data, not by a path of this machine. LIDBOX_RULES_DIR takes
   the place of the installed rules; LIDBOX_DATA_DIR serves a binary without installed data
   beside it (the build tree's), while an installed binary keeps the data of its own version.

ctest runs it as: /usr/bin/python3 test_install.py <lidbox binary> <source dir>, in the build dir.
"""
import calendar
import json
import os
import shutil
import subprocess
import sys
import tempfile

BUILD = os.path.abspath(os.getcwd())
SOURCE = os.path.abspath(sys.argv[2])
failures = []


def check(cond, what):
    if not cond:
        failures.append(what)
        print("FAIL:", what)
    else:
        print("ok:", what)


def cache():
    values = {}
    with open(os.path.join(BUILD, "CMakeCache.txt")) as f:
        for line in f:
            if line.startswith(("#", "//")) or "=" not in line or ":" not in line.split("=")[0]:
                continue
            key_type, value = line.rstrip("\n").split("=", 1)
            values[key_type.split(":")[0]] = value
    return values


def clean_env():
    return {k: v for k, v in os.environ.items() if not k.startswith("LIDBOX_")}


CONSUMER_CMAKE = """cmake_minimum_required(VERSION 3.25)
project(lidbox_consumer LANGUAGES CXX)
find_package(lidbox REQUIRED)
add_executable(consumer main.cpp)
target_link_libraries(consumer PRIVATE lidbox::lidbox)
"""

CONSUMER_MAIN = """#include <iomanip>
#include <iostream>
#include <lidbox/base/time.hpp>
#include <lidbox/base/units.hpp>
int main() {
  const auto t = lidbox::parse_iso8601("2026-01-12T07:00:00-07:00", nullptr, "consumer");
  const double m = lidbox::unit_conversion("ft", "m", "length", "consumer")(1.0);
  std::cout << t << " " << lidbox::format_utc(t) << " " << std::setprecision(17) << m << "\\n";
}
"""


def run(cmd, show_failure=True, **kw):
    p = subprocess.run(cmd, capture_output=True, text=True, **kw)
    if p.returncode != 0 and show_failure:
        print("$", " ".join(cmd), "\n", p.stdout[-3000:], p.stderr[-3000:])
    return p


def test_consumer(c, prefix, tmp):
    src = os.path.join(tmp, "consumer")
    os.makedirs(src)
    with open(os.path.join(src, "CMakeLists.txt"), "w") as f:
        f.write(CONSUMER_CMAKE)
    with open(os.path.join(src, "main.cpp"), "w") as f:
        f.write(CONSUMER_MAIN)
    build = os.path.join(src, "build")
    # The build's own generator, compiler and flags: a sanitizer build's library only links into a
    # program built with the same sanitizer flags.
    configure = [c["CMAKE_COMMAND"], "-S", src, "-B", build, "-G", c["CMAKE_GENERATOR"],
                 "-DCMAKE_PREFIX_PATH=" + prefix]
    for key in ("CMAKE_MAKE_PROGRAM", "CMAKE_CXX_COMPILER", "CMAKE_BUILD_TYPE", "CMAKE_CXX_FLAGS",
                "CMAKE_EXE_LINKER_FLAGS"):
        if c.get(key):
            configure.append("-D%s=%s" % (key, c[key]))
    p = run(configure, env=clean_env())
    check(p.returncode == 0, "the consumer configures with find_package(lidbox)")
    if p.returncode != 0:
        return
    p = run([c["CMAKE_COMMAND"], "--build", build], env=clean_env())
    check(p.returncode == 0, "the consumer builds and links lidbox::lidbox")
    if p.returncode != 0:
        return
    p = run([os.path.join(build, "consumer")], env=clean_env())
    check(p.returncode == 0, "the consumer runs")
    fields = p.stdout.split()
    check(len(fields) == 3, "the consumer prints three values: %r" % p.stdout)
    if len(fields) != 3:
        return
    # 07:00 at UTC-07:00 is 14:00 UTC; the seconds from Python's calendar.timegm.
    expected = calendar.timegm((2026, 1, 12, 14, 0, 0))
    check(int(fields[0]) == expected, "parse_iso8601 gives %s s, expected %d" % (fields[0], expected))
    check(fields[1] == "2026-01-12T14:00:00Z", "format_utc gives %s" % fields[1])
    # The international foot is exactly 0.3048 m (NIST SP 811, Appendix B.8).
    check(abs(float(fields[2]) - 0.3048) < 1e-15, "1 ft is %s m, expected 0.3048" % fields[2])


def copy_demo(folder):
    os.makedirs(folder)
    for name in ("cindervale.toml", "cindervale-met.csv", "cindervale-advisories.toml"):
        shutil.copy(os.path.join(SOURCE, "met-demo", name), folder)


def test_installed_run(prefix, tmp):
    binary = os.path.join(prefix, "bin", "lidbox")
    demo = os.path.join(tmp, "demo")
    copy_demo(demo)
    p = run([binary, "run", "-q", "cindervale.toml", "-o", "out"], cwd=demo, env=clean_env())
    check(p.returncode == 0, "the installed lidbox runs the demo copy with no LIDBOX_* set")
    if p.returncode != 0:
        return
    with open(os.path.join(demo, "out", "report.json")) as f:
        report = json.load(f)
    files = [rs["file"] for rs in report["rule_sets"]]
    check(files == ["lidbox data: rules/us-naaqs.toml", "lidbox data: rules/eu-2008-50.toml",
                    "lidbox data: rules/who-2021.toml", "./cindervale-advisories.toml"],
          "report.json names the shipped rule sets by their place in lidbox's data: %r" % files)
    with open(os.path.join(demo, "out", "report.md")) as f:
        md = f.read()
    check("`lidbox data: rules/us-naaqs.toml`" in md, "report.md names us-naaqs the same way")
    for out in ("report.md", "report.json", "summary.txt", "limits.csv"):
        with open(os.path.join(demo, "out", out)) as f:
            text = f.read()
        check(SOURCE not in text and prefix not in text,
              "%s mentions neither the checkout nor the install prefix" % out)

    # Where the ids were looked up shows in the message for an unknown one.
    with open(os.path.join(demo, "cindervale.toml")) as f:
        case = f.read()
    with open(os.path.join(demo, "cindervale.toml"), "w") as f:
        f.write(case.replace('"who-2021"', '"who-2099"'))
    expected_ids = "eu-2008-50, eu-2024-2881, us-naaqs, who-2021"

    def refused(env, want, what, program=binary):
        p = run([program, "run", "-q", "cindervale.toml", "-o", "out2"], False, cwd=demo, env=env)
        check(p.returncode == 2 and p.stderr == "lidbox: error: " + want + "\n",
              "%s: exit %d, stderr %r" % (what, p.returncode, p.stderr))
        check(not os.path.exists(os.path.join(demo, "out2")), what + ": nothing written")

    refused(clean_env(),
            'rule set "who-2099": not found in %s; expected one of eu-2008-50, eu-2024-2881, '
            'us-naaqs, who-2021 (did you mean "who-2021"?)'
            % os.path.join(prefix, "share", "lidbox", "rules"),
            "with no LIDBOX_* set the ids are looked up in the installed share/lidbox/rules")
    # A folder of the user's own holding one file: the case's second id is missing from it.
    own_rules = os.path.join(tmp, "own-rules")
    os.makedirs(own_rules)
    shutil.copy(os.path.join(prefix, "share", "lidbox", "rules", "us-naaqs.toml"), own_rules)
    refused(dict(clean_env(), LIDBOX_RULES_DIR=own_rules),
            'rule set "eu-2008-50": not found in %s; expected one of us-naaqs' % own_rules,
            "LIDBOX_RULES_DIR takes the place of the installed rules")
    own_data = os.path.join(tmp, "own-data")
    os.makedirs(os.path.join(own_data, "rules"))
    shutil.copy(os.path.join(prefix, "share", "lidbox", "rules", "eu-2008-50.toml"),
                os.path.join(own_data, "rules"))
    # The bulletin's wording is data too (read before the run): the folder holds it as well.
    shutil.copytree(os.path.join(prefix, "share", "lidbox", "bulletin"),
                    os.path.join(own_data, "bulletin"))
    # The installed binary reads the data of its own version, whatever LIDBOX_DATA_DIR says.
    refused(dict(clean_env(), LIDBOX_DATA_DIR=own_data),
            'rule set "who-2099": not found in %s; expected one of eu-2008-50, eu-2024-2881, '
            'us-naaqs, who-2021 (did you mean "who-2021"?)'
            % os.path.join(prefix, "share", "lidbox", "rules"),
            "an installed binary keeps its own data when LIDBOX_DATA_DIR is set")
    # A binary without installed data beside it (the build tree's) takes LIDBOX_DATA_DIR.
    build_binary = os.path.abspath(sys.argv[1])
    refused(dict(clean_env(), LIDBOX_DATA_DIR=own_data),
            'rule set "us-naaqs": not found in %s; expected one of eu-2008-50'
            % os.path.join(own_data, "rules"),
            "LIDBOX_DATA_DIR takes the place of the source tree's data", build_binary)
    refused(dict(clean_env(), LIDBOX_DATA_DIR=os.path.join(tmp, "nowhere")),
            'LIDBOX_DATA_DIR: "%s" is not a folder; expected a folder holding lidbox\'s data '
            '(bulletin/ and the like), or the variable unset' % os.path.join(tmp, "nowhere"),
            "LIDBOX_DATA_DIR naming no folder is refused", build_binary)

def main():
    c = cache()
    with tempfile.TemporaryDirectory() as tmp:
        # /proc/self/exe names the binary with symbolic links resolved; so must the prefix.
        tmp = os.path.realpath(tmp)
        prefix = os.path.join(tmp, "prefix")
        p = run([c["CMAKE_COMMAND"], "--install", BUILD, "--prefix", prefix])
        check(p.returncode == 0, "cmake --install into a temporary prefix")
        if p.returncode != 0:
            return
        for rel in ("bin/lidbox", "include/lidbox/base/time.hpp", "include/lidbox/base/data_dir.hpp",
                    "share/lidbox/rules/us-naaqs.toml", "share/lidbox/rules/README.md"):
            check(os.path.isfile(os.path.join(prefix, rel)), "installed " + rel)
        # lib/ or lib/<multiarch>/, as GNUInstallDirs chose for the configured prefix.
        configs = [os.path.relpath(os.path.join(d, "lidboxConfig.cmake"), prefix)
                   for d, _, names in os.walk(prefix) if "lidboxConfig.cmake" in names]
        check(len(configs) == 1 and configs[0].startswith("lib") and
              configs[0].endswith(os.path.join("cmake", "lidbox", "lidboxConfig.cmake")),
              "installed the CMake package: %r" % configs)
        shipped = sorted(os.listdir(os.path.join(SOURCE, "src", "data", "rules")))
        installed = sorted(os.listdir(os.path.join(prefix, "share", "lidbox", "rules")))
        check(shipped == installed, "every file of src/data/rules is installed: %r" % installed)
        test_consumer(c, prefix, tmp)
        test_installed_run(prefix, tmp)


if __name__ == "__main__":
    main()
    print("%d failed" % len(failures))
    sys.exit(1 if failures else 0)
