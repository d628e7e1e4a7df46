// Every route the app has, read from src/routes on disk: pages (+page.svelte / +page.server.ts),
// the named form actions of each +page.server.ts and the HTTP methods a +server.ts exports. The
// guard matrix uses it to fail on any route that has no row (tests/integration/route-inventory.test.ts).
import { readdirSync, readFileSync } from 'node:fs';
import { join, relative, sep } from 'node:path';
import ts from 'typescript';

export const ROUTES_DIR = join(import.meta.dirname, '../../src/routes');

export interface InventoryRoute {
	kind: 'page' | 'action' | 'endpoint';
	/** GET for pages, POST for actions, the exported name for endpoints. */
	method: string;
	/** The route id as SvelteKit spells it, groups included: `/(app)/admin/people/[id=id]`. */
	routeId: string;
	/** The form action's name (`default` for an unnamed one). */
	action?: string;
	/** The file the route was read from, relative to the repository. */
	file: string;
}

const HTTP_METHODS = new Set([
	'GET',
	'HEAD',
	'POST',
	'PUT',
	'PATCH',
	'DELETE',
	'OPTIONS',
	'fallback'
]);

function walk(dir: string): string[] {
	return readdirSync(dir, { withFileTypes: true }).flatMap((e) =>
		e.isDirectory() ? walk(join(dir, e.name)) : [join(dir, e.name)]
	);
}

function parse(file: string): ts.SourceFile {
	return ts.createSourceFile(file, readFileSync(file, 'utf8'), ts.ScriptTarget.Latest, true);
}

function hasExport(node: ts.Node): boolean {
	return (
		ts.canHaveModifiers(node) &&
		!!ts.getModifiers(node)?.some((m) => m.kind === ts.SyntaxKind.ExportKeyword)
	);
}

/** The names a module exports (`export const X`, `export function X`, `export { a as X }`). */
export function exportedNames(source: ts.SourceFile): string[] {
	const names: string[] = [];
	for (const stmt of source.statements) {
		if (ts.isVariableStatement(stmt) && hasExport(stmt)) {
			for (const d of stmt.declarationList.declarations) {
				if (ts.isIdentifier(d.name)) names.push(d.name.text);
			}
		} else if (ts.isFunctionDeclaration(stmt) && hasExport(stmt) && stmt.name) {
			names.push(stmt.name.text);
		} else if (
			ts.isExportDeclaration(stmt) &&
			stmt.exportClause &&
			ts.isNamedExports(stmt.exportClause)
		) {
			for (const el of stmt.exportClause.elements) names.push(el.name.text);
		}
	}
	return names;
}

/** Strips `satisfies`, `as` and parentheses around an expression. */
function unwrap(expr: ts.Expression): ts.Expression {
	while (
		ts.isSatisfiesExpression(expr) ||
		ts.isAsExpression(expr) ||
		ts.isParenthesizedExpression(expr)
	) {
		expr = expr.expression;
	}
	return expr;
}

let program: ts.Program | null = null;

/** A type-checked view of src/routes, made only when an actions object spreads another one. */
function checkedFile(file: string): { source: ts.SourceFile; checker: ts.TypeChecker } {
	if (!program) {
		const configPath = join(ROUTES_DIR, '../../tsconfig.json');
		const config = ts.readConfigFile(configPath, (f) => ts.sys.readFile(f));
		const parsed = ts.parseJsonConfigFileContent(config.config, ts.sys, join(configPath, '..'));
		const roots = walk(ROUTES_DIR).filter((f) => /\+page\.server\.(ts|js)$/.test(f));
		program = ts.createProgram(roots, { ...parsed.options, noEmit: true });
	}
	const source = program.getSourceFile(file);
	if (!source) throw new Error(`${file}: not in the type-checked program`);
	return { source, checker: program.getTypeChecker() };
}

function actionsLiteral(source: ts.SourceFile): ts.ObjectLiteralExpression | null {
	for (const stmt of source.statements) {
		if (!ts.isVariableStatement(stmt) || !hasExport(stmt)) continue;
		for (const d of stmt.declarationList.declarations) {
			if (!ts.isIdentifier(d.name) || d.name.text !== 'actions') continue;
			const init = d.initializer && unwrap(d.initializer);
			if (!init || !ts.isObjectLiteralExpression(init)) {
				throw new Error(`${source.fileName}: actions is not an object literal`);
			}
			return init;
		}
	}
	return null;
}

/**
 * The keys of `export const actions = { ... }`. A spread (`...activeActions(...)`) is resolved with
 * the type checker; anything else unreadable is an error, so no action is silently missed.
 */
export function actionNames(file: string): string[] {
	const literal = actionsLiteral(parse(file));
	if (!literal) return [];
	const names: string[] = [];
	for (const p of literal.properties) {
		if (
			(ts.isPropertyAssignment(p) ||
				ts.isMethodDeclaration(p) ||
				ts.isShorthandPropertyAssignment(p)) &&
			(ts.isIdentifier(p.name) || ts.isStringLiteral(p.name))
		) {
			names.push(p.name.text);
		} else if (ts.isSpreadAssignment(p)) {
			const { source, checker } = checkedFile(file);
			const spread = actionsLiteral(source)!.properties.find(
				(q) => ts.isSpreadAssignment(q) && q.getText() === p.getText()
			) as ts.SpreadAssignment;
			const props = checker.getTypeAtLocation(spread.expression).getProperties();
			if (!props.length) throw new Error(`${file}: spread ${p.getText()} has no known keys`);
			names.push(...props.map((s) => s.name));
		} else {
			throw new Error(`${file}: cannot read an action name (${p.getText()})`);
		}
	}
	return names;
}

function routeIdOf(file: string): string {
	const dir = relative(ROUTES_DIR, join(file, '..'));
	return '/' + dir.split(sep).filter(Boolean).join('/');
}

/** Every page, form action and endpoint method under src/routes. */
export function routeInventory(): InventoryRoute[] {
	const out: InventoryRoute[] = [];
	const pages = new Set<string>();
	const files = walk(ROUTES_DIR).sort();
	for (const file of files) {
		const name = file.slice(file.lastIndexOf(sep) + 1);
		const routeId = routeIdOf(file);
		const rel = relative(join(ROUTES_DIR, '../..'), file);
		if (/^\+page(\.server)?\.(ts|js|svelte)$/.test(name) && !pages.has(routeId)) {
			pages.add(routeId);
			out.push({ kind: 'page', method: 'GET', routeId, file: rel });
		}
		if (/^\+page\.server\.(ts|js)$/.test(name)) {
			for (const action of actionNames(file)) {
				out.push({ kind: 'action', method: 'POST', routeId, action, file: rel });
			}
		}
		if (/^\+server\.(ts|js)$/.test(name)) {
			for (const method of exportedNames(parse(file)).filter((n) => HTTP_METHODS.has(n))) {
				out.push({ kind: 'endpoint', method, routeId, file: rel });
			}
		}
	}
	return out;
}

/** The route written for people: `GET /admin/people/[id=id]`, `POST /checks?/create`. */
export function describeRoute(r: InventoryRoute): string {
	const path = publicPattern(r.routeId);
	if (r.kind === 'action') return `POST ${path}${r.action === 'default' ? '' : `?/${r.action}`}`;
	return `${r.method} ${path}`;
}

/** The route id without its `(group)` segments, as the URL sees it. */
export function publicPattern(routeId: string): string {
	const segments = routeId.split('/').filter((s) => s && !/^\(.+\)$/.test(s));
	return '/' + segments.join('/');
}

/**
 * A matcher for concrete paths. `[name]` and `[name=matcher]` match one segment (the matcher is
 * `src/params/<matcher>.ts`, run as the app runs it); `[...rest]` and `[[optional]]` are refused
 * rather than guessed, since the app has none.
 */
export async function pathMatcher(routeId: string): Promise<(path: string) => boolean> {
	const parts = publicPattern(routeId).split('/').filter(Boolean);
	const tests: ((segment: string) => boolean)[] = [];
	for (const part of parts) {
		if (part.startsWith('[[') || part.startsWith('[...')) {
			throw new Error(`${routeId}: rest and optional parameters are not handled`);
		}
		const param = /^\[([^\]=]+)(?:=([^\]]+))?\]$/.exec(part);
		if (!param) {
			if (part.includes('[')) throw new Error(`${routeId}: mixed parameter segments not handled`);
			tests.push((s) => s === part);
		} else if (param[2]) {
			const { match } = (await import(`../../src/params/${param[2]}.ts`)) as {
				match: (p: string) => boolean;
			};
			tests.push((s) => match(s));
		} else {
			tests.push((s) => s.length > 0);
		}
	}
	return (path) => {
		const segments = path
			.split('/')
			.filter(Boolean)
			.map((s) => decodeURIComponent(s));
		return segments.length === tests.length && tests.every((t, i) => t(segments[i]));
	};
}
