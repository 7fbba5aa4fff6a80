"""Writes pyedflib-sample.edf with an independent EDF+ writer (pyedflib 0.1.42, which wraps EDFlib), and the
values pyedflib reads back from it, for Isoline's EDF reader tests. Invented signals; no person is described.

Run: python3 make_pyedflib_sample.py   (needs: pip install pyedflib)
"""
import csv
import math

import numpy as np
import pyedflib

FS = 256
SECONDS = 10
n = FS * SECONDS
t = np.arange(n) / FS
ecg_i_uv = 600 * np.sin(2 * math.pi * 1.2 * t) + 80 * np.sin(2 * math.pi * 7 * t)
ecg_ii_mv = 1.1 * np.sin(2 * math.pi * 1.2 * t + 0.4) - 0.2
resp = 50 + 10 * np.sin(2 * math.pi * 0.25 * np.arange(32 * SECONDS) / 32)

headers = [
    dict(label="ECG I", dimension="uV", sample_frequency=FS, physical_min=-1000.0, physical_max=1000.0,
         digital_min=-32768, digital_max=32767, transducer="", prefilter="HP:0.05Hz"),
    dict(label="ECG II", dimension="mV", sample_frequency=FS, physical_min=-2.0, physical_max=2.0,
         digital_min=-2048, digital_max=2047, transducer="", prefilter=""),
    dict(label="Resp", dimension="Ohm", sample_frequency=32, physical_min=0.0, physical_max=100.0,
         digital_min=0, digital_max=1000, transducer="", prefilter=""),
]
path = "pyedflib-sample.edf"
w = pyedflib.EdfWriter(path, 3, file_type=pyedflib.FILETYPE_EDFPLUS)
w.setSignalHeaders(headers)
w.setPatientCode("BENCH-07")
w.setSex(1)
w.setPatientName("Bench Test")
w.setEquipment("Rig_3")
w.writeSamples([ecg_i_uv, ecg_ii_mv, resp])
w.writeAnnotation(0.5, -1, "Made-up start")
w.writeAnnotation(2.25, 0.5, "Pace")
w.writeAnnotation(7.75, -1, "Made-up end")
w.close()

r = pyedflib.EdfReader(path)
with open("pyedflib-sample.values.csv", "w", newline="") as f:
    out = csv.writer(f)
    out.writerow(["lead", "sample", "value_uv"])
    for i, scale in [(0, 1.0), (1, 1000.0)]:
        x = r.readSignal(i)
        for k in [0, 1, 2, 100, 1279, 1280, n - 2, n - 1]:
            out.writerow([r.getLabel(i), k, f"{x[k] * scale:.4f}"])
onsets, durations, texts = r.readAnnotations()
with open("pyedflib-sample.annotations.csv", "w", newline="") as f:
    out = csv.writer(f)
    out.writerow(["onset_s", "duration_s", "text"])
    for o, d, s in zip(onsets, durations, texts):
        out.writerow([o, d, s])
print(r.getHeader(), r.getSignalHeaders()[0])
r.close()
