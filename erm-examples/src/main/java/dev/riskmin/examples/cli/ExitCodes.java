package dev.riskmin.examples.cli;

/**
 * The exit codes of {@link FitCommand} (also listed by {@code --help} and in {@code docs/cli.md}).
 * A script can rely on them: 0 means the fit ran, its outputs were written and the health verdict
 * is CONVERGED; 5 and 6 mean the outputs (except the model, after divergence) were written but
 * the fit should not be trusted as it is.
 */
public final class ExitCodes {
    /** The fit ran, every output was written, and the verdict is CONVERGED. */
    public static final int CONVERGED = 0;
    /** An unexpected failure inside the program (a defect: please report it with the message). */
    public static final int SOFTWARE = 1;
    /** The command line is wrong: an unknown option, a missing or malformed value, or a value out of range. */
    public static final int USAGE = 2;
    /** The input file cannot be used: unreadable, a named column missing, or a cell that is not a valid number. */
    public static final int INPUT = 3;
    /** An output file (model, trace or report) could not be written. */
    public static final int OUTPUT = 4;
    /** The fit ran and its outputs were written, but the verdict is not CONVERGED (and not DIVERGED). */
    public static final int NOT_CONVERGED = 5;
    /** The fit diverged: the trace and the report were written, the model was not. */
    public static final int DIVERGED = 6;

    private ExitCodes() {
    }

    /** The lines {@code --help} shows, "code:meaning". */
    static String[] helpLines() {
        return new String[] {
            CONVERGED + ":the fit ran, every output was written, and the verdict is CONVERGED",
            SOFTWARE + ":unexpected failure inside the program (a defect)",
            USAGE + ":wrong command line: unknown option, missing or malformed value, value out of range",
            INPUT + ":input file unusable: unreadable, a named column missing, a cell that is not a number"
                    + " (the message names the line and column), a target the loss does not accept",
            OUTPUT + ":an output file could not be written",
            NOT_CONVERGED + ":the outputs were written, but the verdict is not CONVERGED (still descending,"
                    + " noise-dominated, step too large, or undetermined): read its advice",
            DIVERGED + ":the fit diverged: trace and report written, no model written",
        };
    }
}
