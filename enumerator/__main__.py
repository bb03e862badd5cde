"""``python -m enumerator`` is the same as the ``isosieve`` command."""

from enumerator.cli import main

if __name__ == "__main__":  # pragma: no cover
    main()
