package org.stackwright.repair;

import java.util.List;
import org.junit.jupiter.api.Test;

class SnakeDiagTmpTest {
    @Test
    void diag() {
        InventedMosaic.Layout l = ShadingSeamTest.SNAKE;
        String only = System.getProperty("diag.seeds", "");
        for (long seed = 44; seed < 64; seed++) {
            if (!only.isEmpty() && !(("," + only + ",").contains("," + seed + ","))) continue;
            List<String> p = ShadingSeamTest.check(l, seed);
            InventedMosaic m = InventedMosaic.make(l, InventedMosaic.Defects.NONE, false, seed);
            SeamDetector.Found f = SeamDetector.detect(m.image, 8, 4);
            System.out.println("DIAG seed " + seed + " " + (p.isEmpty() ? "right" : p));
            System.out.println("DIAG   tiling step " + f.tiling().stepX() + "x" + f.tiling().stepY() + " phaseX "
                    + java.util.Arrays.toString(f.tiling().phaseX()) + " phaseY " + f.tiling().phaseY() + " folded "
                    + f.tiling().folded() + " borrowed " + f.tiling().borrowed());
            System.out.println("DIAG   truth rows " + java.util.Arrays.toString(m.rowSeams) + " cols "
                    + java.util.Arrays.deepToString(m.columnSeams));
            System.out.println("DIAG   rows " + f.rows().stream().map(b -> b.start() + "-" + b.end() + b.looks()).toList());
            System.out.println("DIAG   cols " + f.columns().stream().map(b -> b.start() + "-" + b.end() + "@" + b.from() + ".." + b.to() + b.looks()).toList());
            int best = SeamTemplate.bestStep(SeamTemplate.profiles(m.image, true));
            System.out.println("DIAG   bestStep x " + best);
            int[] ph = f.tiling().phaseX();
            int sy = f.tiling().stepY();
            for (int s = 0; s < ph.length; s++) {
                if (ph[s] < 0 || f.tiling().stepX() <= 0) continue;
                int y0 = s * sy + 2, y1 = Math.min(m.image.height(), (s + 1) * sy - 2);
                System.out.println("DIAG   stripe " + s + " supports(" + f.tiling().stepX() + "," + ph[s] + ") = "
                        + SeamTemplate.supports(m.image, y0, y1, f.tiling().stepX(), ph[s]));
            }
        }
    }
}
