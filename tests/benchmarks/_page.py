"""The shared writer of docs/performance.md: each benchmark owns one marked section."""
import os
import re

HEADER = ("# Performance\n\nMeasured costs of contourkit's layers. Each section is written by its own "
          "benchmark script under `tests/benchmarks/`; rerun the script to refresh its section.\n")
PAGE = os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "..", "docs", "performance.md")


def write_section(name, block, page=PAGE):
    """Replace the text between ``<!-- name:start -->`` and ``<!-- name:end -->`` (block includes both
    markers), or append the block when the page has no such section."""
    text = open(page).read() if os.path.exists(page) else HEADER
    start, end = f"<!-- {name}:start -->", f"<!-- {name}:end -->"
    if start in text:
        text = re.sub(re.escape(start) + ".*" + re.escape(end), lambda _: block, text, flags=re.S)
    else:
        text = text.rstrip("\n") + "\n\n" + block + "\n"
    with open(page, "w") as fh:
        fh.write(text)


def section(name, lines):
    """The marked block of a section: its lines between ``<!-- name:start -->`` and ``<!-- name:end -->``."""
    return "\n".join([f"<!-- {name}:start -->", *lines, f"<!-- {name}:end -->"])


def publish(name, lines, page=PAGE):
    """Write the section made of ``lines`` into the page, print it, and return the block."""
    block = section(name, lines)
    write_section(name, block, page)
    print(block)
    return block
