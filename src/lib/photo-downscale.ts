// Browser-side preparation of a photo before upload: a phone's 12 MP, 4–6 MB JPEG becomes a
// ≤ 2560 px JPEG of a few hundred kB, turned upright, without EXIF (location, camera). The
// server still checks and re-encodes whatever arrives; a file the browser cannot read is sent
// as it is, so the server names the problem.

/** Long side sent by the browser, px; the same as the server's stored full size. */
export const BROWSER_LONG_SIDE = 2560;
const BROWSER_JPEG_QUALITY = 0.85;

/** Target size within `longSide`, never enlarged. */
export function fitLongSide(
	width: number,
	height: number,
	longSide: number = BROWSER_LONG_SIDE
): { width: number; height: number } {
	const scale = Math.min(1, longSide / Math.max(width, height));
	return {
		width: Math.max(1, Math.round(width * scale)),
		height: Math.max(1, Math.round(height * scale))
	};
}

/**
 * Decodes the photo with its EXIF orientation applied, draws it at most BROWSER_LONG_SIDE px on
 * a white canvas (PNG transparency), and encodes a JPEG (canvas output carries no metadata).
 * Keeps the file's name, so messages name the photo the user chose.
 */
export async function downscaleForUpload(file: File): Promise<File> {
	if (typeof createImageBitmap !== 'function' || !/^image\/(jpeg|png)$/.test(file.type)) {
		return file;
	}
	let bitmap: ImageBitmap;
	try {
		bitmap = await createImageBitmap(file, { imageOrientation: 'from-image' });
	} catch {
		return file;
	}
	try {
		const size = fitLongSide(bitmap.width, bitmap.height);
		const canvas = document.createElement('canvas');
		canvas.width = size.width;
		canvas.height = size.height;
		const context = canvas.getContext('2d');
		if (!context) return file;
		context.fillStyle = '#ffffff';
		context.fillRect(0, 0, size.width, size.height);
		context.imageSmoothingQuality = 'high';
		context.drawImage(bitmap, 0, 0, size.width, size.height);
		const blob = await new Promise<Blob | null>((resolve) =>
			canvas.toBlob(resolve, 'image/jpeg', BROWSER_JPEG_QUALITY)
		);
		return blob ? new File([blob], file.name, { type: 'image/jpeg' }) : file;
	} finally {
		bitmap.close();
	}
}
