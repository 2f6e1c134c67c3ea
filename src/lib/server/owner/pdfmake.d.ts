// The part of pdfmake 0.3's server API that the tooling statement uses (the package ships no
// types). Remove this file if @types/pdfmake is ever added.
declare module 'pdfmake' {
	interface PdfOutputDocument {
		getBuffer(): Promise<Buffer>;
	}
	interface PdfFontFiles {
		normal: string;
		bold?: string;
		italics?: string;
		bolditalics?: string;
	}
	interface PdfMake {
		setFonts(fonts: Record<string, PdfFontFiles>): void;
		setUrlAccessPolicy(allow: (url: string) => boolean): void;
		setLocalAccessPolicy(allow: (path: string) => boolean): void;
		createPdf(doc: Record<string, unknown>, options?: Record<string, unknown>): PdfOutputDocument;
	}
	const pdfmake: PdfMake;
	export default pdfmake;
}
