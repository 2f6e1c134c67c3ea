// Nothing lost on a slip: what a toolmaker types into a toolroom form is kept on the device
// (localStorage) as they type, and put back when the page comes again — after a reload, a lost
// connection, or a session that ended and a sign-in in between. A draft goes only when the server
// has taken the form (or the user discards it).
import type { ActionReturn } from 'svelte/action';

const PREFIX = 'castellan:draft:';
/** Drafts older than this are dropped instead of restored. */
const MAX_AGE_MS = 7 * 24 * 3_600_000;

interface Draft {
	savedAt: string;
	fields: Record<string, string | string[]>;
}

/** The draft key for a form: the page path and the form's action. */
export function draftKey(pathname: string, action: string): string {
	return `${PREFIX}${pathname}${action}`;
}

function storage(): Storage | null {
	try {
		return globalThis.localStorage ?? null;
	} catch {
		return null; // private mode or storage switched off: forms still work, without drafts
	}
}

export function readDraft(key: string): Draft | null {
	const raw = storage()?.getItem(key);
	if (!raw) return null;
	try {
		const draft = JSON.parse(raw) as Draft;
		if (Date.now() - Date.parse(draft.savedAt) > MAX_AGE_MS) {
			storage()?.removeItem(key);
			return null;
		}
		return draft;
	} catch {
		storage()?.removeItem(key);
		return null;
	}
}

export function clearDraft(key: string): void {
	storage()?.removeItem(key);
	globalThis.dispatchEvent?.(new CustomEvent(CLEARED, { detail: key }));
}
const CLEARED = 'castellan:draft-cleared';

/**
 * Whether a form result means the server took the form, so its draft can go. A redirect to the
 * sign-in page is not that: the session ended and the draft must stay.
 */
export function formWasTaken(result: { type: string; location?: string }): boolean {
	if (result.type === 'success') return true;
	if (result.type === 'redirect') return !(result.location ?? '').startsWith('/sign-in');
	return false;
}

type Field = HTMLInputElement | HTMLTextAreaElement | HTMLSelectElement;
const SKIPPED = new Set(['hidden', 'file', 'password', 'submit', 'button', 'reset']);

function fieldsOf(form: HTMLFormElement): Field[] {
	return [...form.elements].filter(
		(el): el is Field =>
			(el instanceof HTMLInputElement ||
				el instanceof HTMLTextAreaElement ||
				el instanceof HTMLSelectElement) &&
			!!el.name &&
			!SKIPPED.has(el.type)
	);
}

function collect(form: HTMLFormElement): Record<string, string | string[]> {
	const out: Record<string, string | string[]> = {};
	for (const el of fieldsOf(form)) {
		if (el instanceof HTMLInputElement && (el.type === 'checkbox' || el.type === 'radio')) {
			if (!el.checked) continue;
			const prev = out[el.name];
			out[el.name] =
				el.type === 'radio' ? el.value : [...(Array.isArray(prev) ? prev : []), el.value];
			continue;
		}
		out[el.name] = el.value;
	}
	return out;
}

function hasText(fields: Record<string, string | string[]>, form: HTMLFormElement): boolean {
	// Only a draft with something typed is worth keeping; default choices alone are not.
	return fieldsOf(form).some(
		(el) =>
			(el instanceof HTMLTextAreaElement ||
				(el instanceof HTMLInputElement && !['checkbox', 'radio'].includes(el.type))) &&
			typeof fields[el.name] === 'string' &&
			fields[el.name] !== el.defaultValue &&
			(fields[el.name] as string).trim() !== ''
	);
}

function restore(form: HTMLFormElement, fields: Record<string, string | string[]>) {
	for (const el of fieldsOf(form)) {
		if (!(el.name in fields)) {
			if (el instanceof HTMLInputElement && el.type === 'checkbox' && el.checked) {
				el.checked = false;
				el.dispatchEvent(new Event('change', { bubbles: true }));
			}
			continue;
		}
		const value = fields[el.name];
		if (el instanceof HTMLInputElement && (el.type === 'checkbox' || el.type === 'radio')) {
			const on = Array.isArray(value) ? value.includes(el.value) : value === el.value;
			if (el.checked !== on) {
				el.checked = on;
				el.dispatchEvent(new Event('change', { bubbles: true }));
			}
			continue;
		}
		if (typeof value === 'string' && el.value !== value) {
			el.value = value;
			// Svelte's bindings (and so superforms) listen for these.
			el.dispatchEvent(new Event('input', { bubbles: true }));
			el.dispatchEvent(new Event('change', { bubbles: true }));
		}
	}
}

/**
 * `use:keepDraft={key}` on a form: saves what is typed, restores it on the next visit and says
 * so, with a button to throw the draft away.
 */
export function keepDraft(form: HTMLFormElement, key: string): ActionReturn<string> {
	let current = key;
	let timer: ReturnType<typeof setTimeout> | null = null;
	const note = document.createElement('p');
	note.setAttribute('role', 'status');
	note.className =
		'flex flex-wrap items-center gap-2 rounded-md border border-ember-600 bg-ember-50 px-3 py-2 text-sm';
	note.dataset.testid = 'draft-note';

	const save = () => {
		const fields = collect(form);
		if (!hasText(fields, form)) return clearDraft(current);
		const draft: Draft = { savedAt: new Date().toISOString(), fields };
		try {
			storage()?.setItem(current, JSON.stringify(draft));
		} catch {
			// Storage full or refused: the form still submits; only the safety net is missing.
		}
	};
	const onInput = () => {
		if (timer) clearTimeout(timer);
		timer = setTimeout(save, 300);
	};

	const draft = readDraft(current);
	if (draft) {
		// After the page's own values are in place (superforms sets them on mount).
		queueMicrotask(() => {
			restore(form, draft.fields);
			const time = new Date(draft.savedAt).toLocaleTimeString([], {
				hour: '2-digit',
				minute: '2-digit'
			});
			note.textContent = `Your draft from ${time} is back in this form.`;
			const discard = document.createElement('button');
			discard.type = 'button';
			discard.className = 'btn min-h-11';
			discard.textContent = 'Discard draft';
			discard.onclick = () => {
				clearDraft(current);
				form.reset();
				for (const el of fieldsOf(form)) el.dispatchEvent(new Event('input', { bubbles: true }));
				note.remove();
			};
			note.append(' ', discard);
			form.prepend(note);
		});
	}
	const onSubmit = () => {
		// Keep the very latest text before the request goes: it may be the one that fails.
		if (timer) clearTimeout(timer);
		timer = null;
		save();
	};
	const onCleared = (e: Event) => {
		if ((e as CustomEvent<string>).detail === current) note.remove();
	};
	form.addEventListener('input', onInput);
	form.addEventListener('change', onInput);
	form.addEventListener('submit', onSubmit);
	window.addEventListener(CLEARED, onCleared);
	return {
		update(next: string) {
			current = next;
		},
		destroy() {
			if (timer) {
				clearTimeout(timer);
				save();
			}
			form.removeEventListener('input', onInput);
			form.removeEventListener('change', onInput);
			form.removeEventListener('submit', onSubmit);
			window.removeEventListener(CLEARED, onCleared);
		}
	};
}
