"""Where the bundled demo book lives (an invented company; see demo_portfolios/tessaline/README.md)."""

from pathlib import Path

DEMO_BOOK = Path(__file__).resolve().parents[1] / "demo_portfolios" / "tessaline"
