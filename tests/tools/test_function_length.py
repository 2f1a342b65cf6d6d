#!/usr/bin/env python3
"""Function length: a function body over LIMIT lines must say on its first line why it is one piece.

DEVELOPERS.md: "A function over about 80 lines says on its first line why it must be one piece."
This test measures every function defined in src/ and tests/<room>/ (lambdas inside a function
count towards it) and fails with file:line, the function's name and its length when a body is
longer than LIMIT lines and its first line is not a comment starting with "// One piece:".

The scanner removes comments, string and character literals, then follows braces: a "{" at
namespace or class level whose preceding text ends in ")" (possibly followed by const,
noexcept, override, a trailing return type or a member-initialiser list) opens a function body.

Usage: test_function_length.py <lidbox binary (unused)> <source dir>
"""
import os
import re
import sys

LIMIT = 80
REASON = "// One piece:"

_LITERALS = re.compile(r'R"([^(\s]*)\((?:.|\n)*?\)\1"'     # raw strings
                       r'|"(?:\\.|[^"\\\n])*"'               # strings
                       r"|'(?:\\.|[^'\\\n])*'"               # characters
                       r'|//[^\n]*'                          # line comments
                       r'|/\*(?:.|\n)*?\*/')                 # block comments
_SCOPE_WORDS = re.compile(r'\b(namespace|class|struct|union|enum)\b')
_CONTROL = re.compile(r'\b(if|for|while|switch|catch)\s*$')


def blank_literals(text):
    """Text with comments and literals replaced by spaces, newlines kept (so lines still count)."""
    def keep_newlines(m):
        return "".join("\n" if c == "\n" else " " for c in m.group(0))
    return _LITERALS.sub(keep_newlines, text)


def is_function_head(head):
    """Whether the text before a '{' at namespace or class level is a function signature."""
    head = head.strip()
    if not head or _SCOPE_WORDS.search(head.split("(")[0]):
        return False
    if "=" in head.split("(")[0] and "operator" not in head:
        return False  # an initialiser: "const Foo table = {...}"
    return ")" in head and not _CONTROL.search(head.split("(")[0])


def function_name(head):
    before = head.split("(")[0].split()
    return before[-1] if before else "?"


def long_functions(path):
    with open(path, encoding="utf-8", errors="replace") as f:
        original = f.read()
    lines = original.split("\n")
    text = blank_literals(original)
    found = []
    stack = []  # one entry per open brace: "scope" or ("function", name, line of "{")
    head_start = 0
    line = 1
    for i, c in enumerate(text):
        if c == "\n":
            line += 1
        elif c in ";":
            if not any(isinstance(s, tuple) for s in stack):
                head_start = i + 1
        elif c == "{":
            inside_function = any(isinstance(s, tuple) for s in stack)
            head = text[head_start:i]
            if not inside_function and is_function_head(head):
                stack.append(("function", function_name(head), line))
            else:
                stack.append("scope")
            if not inside_function:
                head_start = i + 1
        elif c == "}":
            if not stack:
                continue
            top = stack.pop()
            if isinstance(top, tuple):
                _, name, first = top
                length = line - first - 1
                first_body = lines[first].strip() if first < len(lines) else ""
                if length > LIMIT and not first_body.startswith(REASON):
                    found.append((first, name, length))
            if not any(isinstance(s, tuple) for s in stack):
                head_start = i + 1
    return found


def main():
    src = sys.argv[2] if len(sys.argv) > 2 else os.path.join(os.path.dirname(__file__), "..", "..")
    problems = []
    checked = 0
    for top in ("src", "tests"):
        for dirpath, _, files in os.walk(os.path.join(src, top)):
            if os.sep + "fuzz" + os.sep + "corpus" in dirpath + os.sep:
                continue
            for name in sorted(files):
                if not name.endswith(".cpp"):
                    continue
                path = os.path.join(dirpath, name)
                checked += 1
                for first, fn, length in long_functions(path):
                    problems.append("%s:%d: %s is %d lines long; expected at most %d, or a first "
                                    "line \"%s <why it must be one piece>\""
                                    % (os.path.relpath(path, src), first, fn, length, LIMIT, REASON))
    for p in problems:
        print("FAIL: " + p)
    if checked < 50:
        print("FAIL: only %d files checked under %s; expected the whole tree" % (checked, src))
        return 1
    print("%d files checked, %d functions over %d lines without a reason" % (checked, len(problems), LIMIT))
    return 1 if problems else 0


if __name__ == "__main__":
    sys.exit(main())
