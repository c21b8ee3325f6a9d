"""The book folder: load every file of a book, write changes back, keep the activity journal.

It sits above the readers of single files (holdings, policy, curve, scenarios) that it assembles,
and below the questions (plan, build) and the façade that take a whole ``Book``.
"""
