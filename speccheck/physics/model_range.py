"""The one exception a model raises in its own words: a beam outside the range the model holds
(a spectrum reaching zero frequency, a phase undefined across the spectrum).  The walk says the
message at the stage; any other failure of arithmetic is said in general terms."""


class OutOfModelRange(ValueError):
    """A number outside what a model can compute, with a message fit to show the user."""
