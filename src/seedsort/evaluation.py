"""Measures of a run against known labels: accuracy, macro-F1, calibration error, AUROC.

Used by the benchmarks and by the seed cross-check. Accuracy, macro-F1 and AUROC are the
scikit-learn metrics; expected calibration error is the usual equal-width-bin estimate
(Naeini, Cooper & Hauskrecht 2015; 15 bins as in Guo et al. 2017).
"""

from __future__ import annotations

import numpy as np


def expected_calibration_error(confidence: np.ndarray, correct: np.ndarray, bins: int = 15) -> float:
    """ECE = sum over bins of (bin share) * |accuracy in bin - mean confidence in bin|.

    Parameters
    ----------
    confidence:
        (m,) probability of the predicted category, in [0, 1].
    correct:
        (m,) whether the prediction was right.
    bins:
        Equal-width bins over [0, 1]; a confidence of exactly 1 falls in the last one.
    """
    confidence = np.asarray(confidence, dtype=float)
    correct = np.asarray(correct, dtype=float)
    if confidence.size == 0:
        return 0.0
    which = np.minimum((confidence * bins).astype(int), bins - 1)
    total = 0.0
    for b in range(bins):
        members = which == b
        if members.any():
            total += members.mean() * abs(correct[members].mean() - confidence[members].mean())
    return float(total)


def per_category_accuracy(true: np.ndarray, predicted: np.ndarray, n_classes: int) -> np.ndarray:
    """Share of each category's items predicted correctly (recall); NaN where a category has none."""
    out = np.full(n_classes, np.nan)
    for c in range(n_classes):
        members = true == c
        if members.any():
            out[c] = float(np.mean(predicted[members] == c))
    return out
