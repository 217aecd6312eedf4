"""Command line: ``python -m plantside.climate.generate --out DIR``.

Rewrites the bundled fictional weather years (byte for byte the files shipped in
``plantside/data``) from :mod:`plantside.climate.fictional_sites`.
"""

import argparse

from plantside.climate.fictional_sites import write_bundled_climates


def main(argv=None) -> int:
    """Write every bundled fictional site as ``<slug>.csv`` in ``--out``."""
    parser = argparse.ArgumentParser(
        prog="python -m plantside.climate.generate",
        description="Write the bundled fictional weather years as <site>.csv files.",
    )
    parser.add_argument("--out", required=True, help="output directory")
    args = parser.parse_args(argv)
    for path in write_bundled_climates(args.out):
        print(path)
    return 0


if __name__ == "__main__":  # pragma: no cover
    raise SystemExit(main())
