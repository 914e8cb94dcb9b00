"""``python -m stillair.addin.templates [NAME ...]``: rebuild the committed template workbooks."""

import sys

from . import all_templates
from ..templatebook import build_template


def main(names: list[str]) -> int:
    chosen = [t for t in all_templates() if not names or t.name in names]
    unknown = set(names) - {t.name for t in chosen}
    if unknown:
        print(f"unknown template(s): {', '.join(sorted(unknown))}", file=sys.stderr)
        return 2
    for template in chosen:
        print(f"built {build_template(template)}")
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
