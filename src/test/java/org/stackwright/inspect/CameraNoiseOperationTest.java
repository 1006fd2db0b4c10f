package org.stackwright.inspect;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.ByteArrayOutputStream;
import java.io.PrintStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.stackwright.cli.Main;
import org.stackwright.testing.CameraData;
import org.stackwright.volume.TiffFiles;

/**
 * {@code camera-noise} from the command line: the estimate from the image and from dark frames is printed, recorded
 * with its sources and standard errors, and the photon-transfer plot is written. The accuracy of the estimates is
 * checked in {@code model.CameraEstimateTest}.
 */
class CameraNoiseOperationTest {

    @TempDir
    Path dir;

    @Test
    void printsRecordsAndPlotsTheEstimate() throws Exception {
        CameraData cam = new CameraData(CameraData.Kind.SCMOS, 96, 96, 21);
        Path in = dir.resolve("cells.tif");
        Path dark = dir.resolve("dark.tif");
        TiffFiles.write(cam.record(CameraData.specimen(96, 96, 9, 1, 22), 9), in, false);
        TiffFiles.write(cam.dark(12), dark, false);
        Path rec = dir.resolve("camera.json");
        Path plot = dir.resolve("transfer.png");
        ByteArrayOutputStream out = new ByteArrayOutputStream();
        ByteArrayOutputStream err = new ByteArrayOutputStream();
        int code = Main.run(new String[] {"camera-noise", "--input", in.toString(), "--dark", dark.toString(),
            "--record", rec.toString(), "--plot", plot.toString()}, new PrintStream(out, true, StandardCharsets.UTF_8),
                new PrintStream(err, true, StandardCharsets.UTF_8));
        String printed = out.toString(StandardCharsets.UTF_8) + err.toString(StandardCharsets.UTF_8);
        assertEquals(Main.OK, code, printed);
        assertTrue(printed.contains("gain: ") && printed.contains("(image)"), printed);
        assertTrue(printed.contains("read noise: ") && printed.contains("(dark-frames)"), printed);
        String json = Files.readString(rec);
        for (String key : new String[] {"\"camera_source\"", "\"camera_standard_error\"", "\"photon_transfer_levels\"",
            "\"dark-frames\"", "\"offset_adu\""}) {
            assertTrue(json.contains(key), key + " missing in " + json);
        }
        assertTrue(Files.size(plot) > 1000, "plot written");
    }
}
