package org.starderive.job;

/**
 * A failure that stops the job before anything is written, with the exit code that tells its kind. The message
 * names the thing (file, column, config key), shows the value and states the rule.
 */
public final class JobException extends RuntimeException {
    private static final long serialVersionUID = 1L;

    /** Exit codes of the command line. */
    public enum Kind {
        /** Command-line usage or configuration file error. */
        CONFIG(2),
        /**
         * The input dataset violates a rule (missing column, wrong type, unreadable file, empty input ...), or an input
         * file changed while the run read it (found just before the commit; nothing is committed).
         */
        INPUT(3),
        /**
         * The output location cannot be used (exists in fail mode, inside the input, not writable ...), another run
         * holds its lease, or the storage failed while the output was written or committed (nothing is committed).
         */
        OUTPUT(4),
        /** The written output failed the row-conservation check; it was not committed. */
        CONSERVATION(5);

        private final int exitCode;

        Kind(int exitCode) { this.exitCode = exitCode; }

        public int exitCode() { return exitCode; }
    }

    private final Kind kind;

    public JobException(Kind kind, String message) {
        super(message);
        this.kind = kind;
    }

    public JobException(Kind kind, String message, Throwable cause) {
        super(message, cause);
        this.kind = kind;
    }

    public Kind kind() { return kind; }

    public static JobException config(String message) { return new JobException(Kind.CONFIG, message); }

    public static JobException input(String message) { return new JobException(Kind.INPUT, message); }

    public static JobException output(String message) { return new JobException(Kind.OUTPUT, message); }
}
