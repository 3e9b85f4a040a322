#!/usr/bin/python3
"""Strict checks of a study sheet (HTML) with Python's standard library only.

usage: check_sheet_html.py SHEET.html [STUDY_FILE]

- the sheet is well-formed XML (xml.etree.ElementTree, expat: every element closed, attributes
  quoted, no stray '&' or '<'), so a strict parser reads it;
- html.parser sees every opened element closed in order (void elements aside);
- no script, no event-handler attributes, no external resources (href/src to other files): the
  sheet is inert and self-contained;
- with STUDY_FILE: the SHA-256 written on the sheet is hashlib's digest of that file.
Prints "ok" or the first problem and exits 1.
"""
import hashlib
import html.parser
import re
import sys
import xml.etree.ElementTree as ET

VOID = {"meta", "img", "br", "hr", "link", "input"}


class Balance(html.parser.HTMLParser):
    def __init__(self):
        super().__init__(convert_charrefs=True)
        self.stack = []
        self.problems = []

    def handle_starttag(self, tag, attrs):
        if tag == "script":
            self.problems.append("a script element")
        for name, value in attrs:
            if name.startswith("on"):
                self.problems.append(f"an event handler attribute {name}")
            if name in ("src", "href") and value is not None and not value.startswith(("#", "picture:")):
                self.problems.append(f"an external resource {name}={value!r}")
        if tag not in VOID:
            self.stack.append(tag)

    def handle_startendtag(self, tag, attrs):
        self.handle_starttag(tag, attrs)
        if tag not in VOID:
            self.stack.pop()

    def handle_endtag(self, tag):
        if not self.stack or self.stack[-1] != tag:
            self.problems.append(f"</{tag}> closes {self.stack[-1] if self.stack else 'nothing'}")
        else:
            self.stack.pop()


def main():
    path = sys.argv[1]
    text = open(path, encoding="utf-8").read()
    try:
        ET.fromstring(text)
    except ET.ParseError as e:
        print(f"not well-formed: {e}")
        return 1
    b = Balance()
    b.feed(text)
    b.close()
    if b.stack:
        b.problems.append(f"unclosed elements {b.stack}")
    if b.problems:
        print("; ".join(b.problems))
        return 1
    if len(sys.argv) > 2:
        digest = hashlib.sha256(open(sys.argv[2], "rb").read()).hexdigest()
        found = re.findall(r"\b[0-9a-f]{64}\b", text)
        if found != [digest]:
            print(f"checksum on the sheet {found} is not hashlib's {digest}")
            return 1
    print("ok")
    return 0


if __name__ == "__main__":
    sys.exit(main())
