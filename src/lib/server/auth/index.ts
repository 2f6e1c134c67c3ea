import { dev } from '$app/environment';
import { getDb } from '../db';
import { createLucia, type CastellanLucia } from './lucia';

let lucia: CastellanLucia | undefined;

/** The app's Lucia instance; cookies are Secure except in `vite dev` and plain-http demos. */
export function getLucia(): CastellanLucia {
	const insecure = dev || process.env.ORIGIN?.startsWith('http://') || !process.env.ORIGIN;
	lucia ??= createLucia(getDb(), !insecure);
	return lucia;
}
