"""Characterising a part from its measured voltage transfer curve (``levelcross curve``).

The stages run one way, each in its own module:

- :mod:`linter.curve.csvread`: read (input volts, output volts) rows into a
  :class:`~linter.curve.csvread.MeasuredCurve`, merging repeated inputs;
- :mod:`linter.curve.smoothing`: fit a smoothing spline whose slope is the stage's gain;
- :mod:`linter.curve.analysis`: unity-gain points, output levels, threshold, peak gain, margins
  and the static-discipline findings;
- :mod:`linter.curve.familycheck`: how far the curve clears the forbidden regions of a family;
- :mod:`linter.curve.emit`: a family YAML written from the measurement;
- :mod:`linter.curve.report`: text and JSON renderings of the results;
- :mod:`linter.curve.plot`: the curve drawn with its levels and forbidden regions.
"""
