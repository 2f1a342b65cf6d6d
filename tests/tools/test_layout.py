#!/usr/bin/env python3
"""The rooms of the library and which way includes may run.

    cli -> report -> analysis | grid -> engine | standards | diagnostics -> met -> base

A file may include headers of its own room and of rooms below it; engine, standards and
diagnostics are peers and never include each other, nor do analysis and grid.
Headers live in include/lidbox/<room>/, sources in
src/<room>/, tests in tests/<room>/. Private headers of a room (src/<room>/*.hpp) follow the
same rule. Fails with the file, the line and the offending include.

Usage: test_layout.py <lidbox binary (unused)> <source dir>
"""
import os
import re
import sys

RANK = {"base": 0, "met": 1, "engine": 2, "standards": 2, "diagnostics": 2, "analysis": 3, "grid": 3,
        "report": 4, "cli": 5}
INCLUDE = re.compile(r'^\s*#\s*include\s*[<"]([^>"]+)[>"]')


def room_of_include(target):
    """Room of an included path, or None for system and test-helper headers."""
    parts = target.split("/")
    if parts[0] == "lidbox" and len(parts) >= 3 and parts[1] in RANK:
        return parts[1]
    if parts[0] == "lidbox":
        return "?"  # a lidbox header outside every room
    if len(parts) >= 2 and parts[0] in RANK:
        return parts[0]  # a private header, "base/civil_calendar.hpp"
    return None


def room_of_file(rel):
    parts = rel.split(os.sep)
    if parts[0] == "include" and len(parts) >= 4:
        return parts[2]
    if parts[0] in ("src", "tests") and len(parts) >= 3 and parts[1] in RANK:
        return parts[1]
    return None


def main():
    src = sys.argv[2] if len(sys.argv) > 2 else os.path.join(os.path.dirname(__file__), "..", "..")
    problems = []
    checked = 0
    for top in ("include", "src", "tests"):
        for dirpath, _, files in os.walk(os.path.join(src, top)):
            for name in files:
                if not name.endswith((".hpp", ".cpp", ".h")):
                    continue
                path = os.path.join(dirpath, name)
                rel = os.path.relpath(path, src)
                room = room_of_file(rel)
                if top == "include" and room not in RANK:
                    problems.append("%s: a public header outside every room; expected "
                                    "include/lidbox/<room>/ with room one of %s" % (rel, ", ".join(RANK)))
                    continue
                if top == "src" and rel.count(os.sep) == 1:
                    problems.append("%s: a source outside every room; expected src/<room>/" % rel)
                    continue
                if room is None:
                    continue
                checked += 1
                with open(path, encoding="utf-8") as f:
                    for line_no, line in enumerate(f, 1):
                        m = INCLUDE.match(line)
                        if not m:
                            continue
                        target_room = room_of_include(m.group(1))
                        if target_room is None or target_room == room:
                            continue
                        if target_room == "?":
                            problems.append("%s:%d: includes \"%s\", a lidbox header outside every "
                                            "room" % (rel, line_no, m.group(1)))
                        elif RANK[target_room] >= RANK[room]:
                            problems.append("%s:%d: room %s includes \"%s\" of room %s; expected "
                                            "only rooms below %s (cli -> report -> analysis | grid -> "
                                            "engine | standards | diagnostics -> met -> base)"
                                            % (rel, line_no, room, m.group(1), target_room, room))
    for p in problems:
        print("FAIL: " + p)
    if checked < 50:
        print("FAIL: only %d files checked under %s; expected the whole tree" % (checked, src))
        return 1
    print("%d files checked, %d upward includes" % (checked, len(problems)))
    return 1 if problems else 0


if __name__ == "__main__":
    sys.exit(main())
