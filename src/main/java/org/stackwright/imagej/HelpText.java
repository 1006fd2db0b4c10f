package org.stackwright.imagej;

import org.stackwright.op.Operation;
import org.stackwright.op.Param;

/** The help page of a dialog (its Help button), written from the operation's parameters. */
final class HelpText {

    /** The cautions every help page and the About box repeat. */
    static final String CAUTIONS = "Deconvolved and inpainted pixels are estimates, not measurements: exclude "
            + "inpainted pixels from measurements (each repair also returns the mask of the pixels it filled). "
            + "Modelled PSFs are idealised. Not for diagnostic use; follow your facility's validated protocols.";

    private HelpText() {
    }

    static String html(Operation op) {
        StringBuilder sb = new StringBuilder("<html><h2>Stackwright: ").append(esc(op.name())).append("</h2><p>")
                .append(esc(op.summary())).append("</p><table border=1 cellpadding=2>")
                .append("<tr><th>macro key</th><th>unit</th><th>default</th><th>allowed</th><th>meaning</th></tr>");
        for (Param p : op.params()) {
            if (!OperationDialog.inDialog(p)) {
                continue;
            }
            sb.append("<tr><td>").append(esc(p.key())).append("</td><td>").append(esc(p.unit())).append("</td><td>")
                    .append(esc(p.defaultValue() == null ? (p.required() ? "required" : "") : p.defaultValue()))
                    .append("</td><td>").append(esc(allowed(p))).append("</td><td>").append(esc(p.help()))
                    .append("</td></tr>");
        }
        sb.append("</table><p>Keys are the command-line options without '--'. For a multi-channel image, a number "
                + "may be a comma list with one value per channel (e.g. 520,610), and a PSF or mask with one channel "
                + "per channel is used channel by channel. Time points are processed in turn. Outputs are new images "
                + "titled &lt;title&gt;-").append(esc(op.name())).append("; the input is never modified. "
                + "Press Esc to cancel.</p><p><b>Caution.</b> ").append(esc(CAUTIONS)).append("</p></html>");
        return sb.toString();
    }

    private static String allowed(Param p) {
        return switch (p.kind()) {
            case CHOICE -> String.join(" | ", p.choices());
            case NUMBER, INTEGER -> Param.fmt(p.min()) + " to "
                    + (p.max() >= Integer.MAX_VALUE ? "any" : Param.fmt(p.max()));
            case FLAG, OUTPUT_IMAGE -> "on | off";
            case IMAGE -> "an open image" + (p.required() ? "" : " or none");
            case OUTPUT_FILE -> "a file path";
            default -> "text";
        };
    }

    private static String esc(String s) {
        return s.replace("&", "&amp;").replace("<", "&lt;").replace(">", "&gt;");
    }
}
