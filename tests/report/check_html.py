#!/usr/bin/python3
"""Checks a Saddlewise review report as a browser-independent HTML5 parser sees it.

Usage: check_html.py REPORT.html
Prints one JSON object: html5lib's version, its parse errors, every reference to something
outside the file (attributes that load or link a resource, url() and @import in styles), the
ids of the <section> elements, and the number of inline <svg> figures.

Parser: html5lib (Debian python3-html5lib), which implements the WHATWG HTML parsing
algorithm and lists every parse error it meets.
"""
import json
import re
import sys

import html5lib

# Attributes through which a document loads or points at another resource.
LOADING = {"src", "href", "srcset", "poster", "data", "action", "formaction", "background",
           "cite", "longdesc", "manifest", "ping", "codebase", "archive", "usemap"}
URL_IN_STYLE = re.compile(r"url\(\s*['\"]?([^'\")]*)")


def inside(value):
    """True for references that stay inside the file: fragments and data: URIs."""
    value = value.strip()
    return value == "" or value.startswith("#") or value.lower().startswith("data:")


def main(path):
    with open(path, "rb") as f:
        data = f.read()
    parser = html5lib.HTMLParser(strict=False, namespaceHTMLElements=False)
    tree = parser.parse(data)
    errors = []
    for position, code, variables in parser.errors:
        errors.append("line %s col %s: %s %s" % (position[0], position[1], code, json.dumps(variables)))
    external, sections, svgs = [], [], 0
    for element in tree.iter():
        tag = element.tag if isinstance(element.tag, str) else ""
        local = tag.split("}")[-1]
        if local == "svg":
            svgs += 1
        if local == "section" and element.get("id"):
            sections.append(element.get("id"))
        if local in ("link", "iframe", "embed", "object", "base", "frame"):
            external.append("<%s> element" % local)
        if local == "meta" and (element.get("http-equiv") or "").lower() == "refresh":
            external.append("<meta http-equiv=refresh>")
        for name, value in element.attrib.items():
            attribute = name.split("}")[-1] if isinstance(name, str) else str(name)
            if attribute in LOADING and not inside(value):
                external.append("%s %s=%r" % (local, attribute, value[:120]))
            if attribute == "style":
                for found in URL_IN_STYLE.findall(value):
                    if not inside(found):
                        external.append("%s style url(%s)" % (local, found[:120]))
        if local == "style" and element.text:
            for found in URL_IN_STYLE.findall(element.text):
                if not inside(found):
                    external.append("<style> url(%s)" % found[:120])
            if "@import" in element.text:
                external.append("<style> @import")
        if local == "script" and element.get("src"):
            external.append("<script src>")
    print(json.dumps({"html5lib": html5lib.__version__, "errors": errors, "external": external,
                      "sections": sections, "svg": svgs}))


if __name__ == "__main__":
    main(sys.argv[1])
