"""planpack: compile an HF net plan into schedules, cut sheets, a site and field cards."""

__version__ = "0.1.0"
