"""Outputs, by topic: ``line`` (one cross-section's table, JSON and heading;
``line_picture`` the field solver's picture), ``channel`` (a build's Touchstone file,
charts, summary and the writing of a build), ``budget`` (the loss budget's text, CSV,
JSON and charts), ``design`` (size, compare, spread and materials tables and charts),
``page`` (the self-contained HTML report), ``timeviews`` (quality and time-domain views:
text, charts, HTML, a build's hooks), ``inspect`` (``losslane inspect``'s text and
files). Shared: ``text`` (terminal tables), ``charts`` (matplotlib set-up and dB charts).
Files are written atomically (``losslane.atomic``)."""
