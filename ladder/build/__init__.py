"""The ladder builder: candidates, rungs, the mixed-integer program and its explanation."""
