import java.nio.file.Path;
import java.util.Locale;

import org.stackwright.volume.TiffFiles;
import org.stackwright.volume.Volume;

/**
 * Largest absolute difference of two stacks of one size, and the largest absolute value of the first, for
 * tools/spark-standalone-demo.sh. Run as a single source file on the command-line jar:
 * {@code java -cp target/stackwright.jar tools/spark-standalone/MaxDifference.java A.tif B.tif}.
 * Prints "size WxHxD, largest difference D, maximum M, relative R" and exits 1 when the sizes differ.
 */
public final class MaxDifference {

    private MaxDifference() {
    }

    public static void main(String[] args) {
        Volume a = TiffFiles.read(Path.of(args[0]), "first stack");
        Volume b = TiffFiles.read(Path.of(args[1]), "second stack");
        if (a.width() != b.width() || a.height() != b.height() || a.depth() != b.depth()) {
            System.out.println("the stacks differ in size");
            System.exit(1);
        }
        float[] x = a.data();
        float[] y = b.data();
        double diff = 0;
        double max = 0;
        for (int i = 0; i < x.length; i++) {
            diff = Math.max(diff, Math.abs((double) x[i] - y[i]));
            max = Math.max(max, Math.abs(x[i]));
        }
        System.out.printf(Locale.ROOT, "size %dx%dx%d, largest difference %.3g, maximum %.4g, relative %.3g%n",
                a.width(), a.height(), a.depth(), diff, max, max == 0 ? 0 : diff / max);
    }
}
