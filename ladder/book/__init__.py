"""Reading, validating and saving a book folder."""
