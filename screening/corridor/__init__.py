"""Tools on a whole corridor: edit many segments (``edit``), quantities and rough cost
(``quantities``), two versions compared (``diff``) and what the verdicts hang on
(``sensitivity``)."""
