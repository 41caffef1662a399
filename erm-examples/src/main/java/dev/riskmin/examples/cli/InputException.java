package dev.riskmin.examples.cli;

/**
 * The input file cannot be used: it is unreadable, lacks a named column, or holds a cell that is
 * not a number the fit can take. The message names the file, the line and the column where one
 * applies. Leads to exit code {@link ExitCodes#INPUT}.
 */
final class InputException extends Exception {
    InputException(String message) {
        super(message);
    }

    InputException(String message, Throwable cause) {
        super(message, cause);
    }
}
