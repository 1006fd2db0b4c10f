package org.stackwright.imagej;

import ij.IJ;

import org.stackwright.cli.Version;
import org.stackwright.op.Operation;
import org.stackwright.registry.Operations;

/** The About box: version, what the suite does, the operations of this build and the cautions. */
final class About {

    private About() {
    }

    static String text() {
        StringBuilder sb = new StringBuilder("Stackwright ").append(Version.get()).append("\n \n")
                .append("Restores microscopy images: PSFs (modelled and from beads), deconvolution,\n")
                .append("repair of defective pixels and tile seams, residual checks.\n \nOperations in this build:\n");
        for (Operation op : Operations.all()) {
            sb.append("  ").append(op.name()).append(": ").append(op.summary()).append('\n');
        }
        sb.append(" \nCautions:\n");
        for (String line : HelpText.CAUTIONS.split("(?<=\\.) ")) {
            sb.append("  ").append(line).append('\n');
        }
        sb.append(" \nThe same settings work from macros (the Macro Recorder writes them),\n")
                .append("SciJava scripts and the command line (java -jar stackwright.jar --help).\nLicence: BSD-2-Clause.");
        return sb.toString();
    }

    static void show() {
        IJ.showMessage("About Stackwright", text());
    }
}
