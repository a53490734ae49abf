"""``python -m workbench``."""

from workbench.cli import main

if __name__ == "__main__":
    raise SystemExit(main())
