package report

import (
	"archive/zip"
	"io"

	"github.com/klauspost/compress/flate"
	"github.com/xuri/excelize/v2"
)

// deflateLevel is the compression level of the workbook's parts. A city's
// year fills the Speed v detour sheet with about 10⁵ rows (40 MB of XML);
// compressing it took a third of the workbook's time with the standard
// library's deflate. klauspost/compress's deflate at this level writes the
// same format (any spreadsheet program reads it) two to three times
// faster, for files a few per cent larger.
const deflateLevel = 5

// newZipWriter is the workbook's ZIP writer: archive/zip with a faster
// deflate.
func newZipWriter(w io.Writer) excelize.ZipWriter {
	zw := zip.NewWriter(w)
	zw.RegisterCompressor(zip.Deflate, func(out io.Writer) (io.WriteCloser, error) {
		return flate.NewWriter(out, deflateLevel)
	})
	return zw
}
