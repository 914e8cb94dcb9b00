"""``python -m stillair.addin.templates [NAME ...]``: rebuild the committed template workbooks.

``python -m stillair.addin.templates --pictures DIR`` prints each template with LibreOffice and
writes the first page of its Results sheet as DIR/NAME-results.png (the README's pictures)."""

import sys

from . import all_templates
from .build import build_template


def main(names: list[str]) -> int:
    if names[:1] == ["--pictures"]:
        from .render import render_pictures

        if len(names) != 2:
            print("usage: python -m stillair.addin.templates --pictures DIR", file=sys.stderr)
            return 2
        for picture in render_pictures(names[1]):
            print(f"rendered {picture}")
        return 0
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
