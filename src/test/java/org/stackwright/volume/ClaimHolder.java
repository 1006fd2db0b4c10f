package org.stackwright.volume;

import java.nio.file.Path;

/**
 * A separate process for {@code OutputSafetyTest}: claims the output named by its argument, says so on stdout and
 * holds the claim until it is killed (or its stdin closes), as a second run writing the same file would.
 */
public final class ClaimHolder {

    private ClaimHolder() {
    }

    public static void main(String[] args) throws Exception {
        try (OutputClaim c = OutputClaim.take("--output", Path.of(args[0]))) {
            System.out.println("claimed");
            System.out.flush();
            while (System.in.read() >= 0) {
                // hold until killed or stdin closes
            }
        }
    }
}
