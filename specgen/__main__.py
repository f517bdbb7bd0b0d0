"""``python -m specgen`` runs the command-line interface."""
from specgen.cli import main

if __name__ == "__main__":
    main()
