"""``python -m taumatch`` runs the command line."""

from taumatch.cli import main

if __name__ == "__main__":  # pragma: no cover
    main(prog_name="taumatch")
