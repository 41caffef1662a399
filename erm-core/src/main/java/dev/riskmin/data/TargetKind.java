package dev.riskmin.data;

/** What a dataset's targets y<sub>i</sub> are. */
public enum TargetKind {
    /** Real values (regression, counts, proportions): any finite number; the loss narrows the domain. */
    REAL,
    /** Class labels 0 … K−1 for K ≥ 2 classes, stored as doubles holding whole numbers. */
    CLASSES
}
