package org.starderive.job;

import java.io.IOException;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import org.apache.hadoop.fs.Path;

/**
 * One step of a commit plan — move a file or folder, or create a folder — and the plan's journal format (JSON: the
 * run id, the write mode and the steps in order), written by {@link OutputCommitter} before the first move so that
 * the next run can undo a commit its run did not finish.
 */
final class CommitStep {
    enum Op { MOVE, MKDIR }

    final Op op;
    final Path from;
    final Path to;

    private CommitStep(Op op, Path from, Path to) {
        this.op = op;
        this.from = from;
        this.to = to;
    }

    static CommitStep move(Path from, Path to) { return new CommitStep(Op.MOVE, from, to); }

    static CommitStep mkdir(Path dir) { return new CommitStep(Op.MKDIR, null, dir); }

    String describe() { return op == Op.MKDIR ? "create " + to : "move " + from + " -> " + to; }

    static String render(String runId, OutputCommitter.Mode mode, List<CommitStep> plan) {
        com.fasterxml.jackson.databind.ObjectMapper m = new com.fasterxml.jackson.databind.ObjectMapper();
        com.fasterxml.jackson.databind.node.ObjectNode root = m.createObjectNode();
        root.put("run_id", runId);
        root.put("write_mode", mode.label());
        com.fasterxml.jackson.databind.node.ArrayNode steps = root.putArray("steps");
        for (CommitStep s : plan) {
            com.fasterxml.jackson.databind.node.ObjectNode n = steps.addObject();
            n.put("op", s.op.name().toLowerCase(Locale.ROOT));
            if (s.from != null) {
                n.put("from", s.from.toString());
            }
            n.put("to", s.to.toString());
        }
        try {
            return m.writerWithDefaultPrettyPrinter().writeValueAsString(root) + "\n";
        } catch (IOException e) {
            throw new IllegalStateException(e);
        }
    }

    static List<CommitStep> parse(String text, Path where) {
        try {
            com.fasterxml.jackson.databind.JsonNode root = new com.fasterxml.jackson.databind.ObjectMapper().readTree(text);
            List<CommitStep> plan = new ArrayList<>();
            for (com.fasterxml.jackson.databind.JsonNode n : root.get("steps")) {
                String op = n.get("op").asText();
                if (op.equals("mkdir")) {
                    plan.add(mkdir(new Path(n.get("to").asText())));
                } else {
                    plan.add(move(new Path(n.get("from").asText()), new Path(n.get("to").asText())));
                }
            }
            return plan;
        } catch (IOException | RuntimeException e) {
            throw JobException.output("Commit journal " + where + " cannot be read (" + e.getMessage() + ") (rule: a journal "
                    + "left by a killed run is undone before the next run); inspect it and remove it by hand");
        }
    }
}
