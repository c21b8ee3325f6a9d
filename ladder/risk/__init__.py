"""Risk: rate scenarios on the par curve and the revaluation of the book under them."""
