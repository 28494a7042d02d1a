"""Bench work around the diagnosis: a trim loop over a folder the instrument saves into,
before/after comparison, and many captures in one go.

* :mod:`.job` — one file read and diagnosed with fixed settings, its outcome as one row.
* :mod:`.folder` — new files of a folder, handed on once they stop changing.
* :mod:`.trimloop` — the trim loop (:class:`TrimLoop`).
* :mod:`.compare` — two diagnoses before and after a turn of the trim (:func:`compare`).
* :mod:`.batch` — a batch in parallel on the local cores (:func:`batch_diagnose`).
"""

from .batch import BatchResult, batch_diagnose, capture_files
from .compare import Comparison, compare
from .folder import NewFiles
from .job import DiagnosisSettings, Outcome, diagnose_file
from .trimloop import LoopSummary, TrimLoop

__all__ = ["BatchResult", "Comparison", "DiagnosisSettings", "LoopSummary", "NewFiles",
           "Outcome", "TrimLoop", "batch_diagnose", "capture_files", "compare", "diagnose_file"]
