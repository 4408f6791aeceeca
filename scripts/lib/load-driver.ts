// The load generator of `npm run bench:load`, run as its own process so the load it makes does
// not share an event loop with the app or the benchmark's bookkeeping. Reads its plan as JSON from
// argv[2], runs one autocannon instance per kind of request at the same time for the same
// bounded duration, and prints one JSON line with each kind's figures.
import autocannon, { type Request } from 'autocannon';

export interface LoadPlan {
	base: string;
	seconds: number;
	token: string;
	cookie: string;
	loopIds: string[];
	uploadLoopIds: string[];
	/** Connections per kind. */
	connections: Record<Kind, number>;
}

export type Kind = 'api-filtered-list' | 'api-loop' | 'loop-page' | 'upload';

export interface KindResult {
	kind: Kind;
	requests: number;
	throughput: number;
	p50: number;
	p90: number;
	p99: number;
	max: number;
	errors: number;
	timeouts: number;
	non2xx: number;
	statusCodes: Record<string, number>;
	/** Uploads only: the revision ids of the uploads answered 202. */
	acceptedIds?: string[];
}

const VERDICTS = ['compliant', 'noncompliant', 'unstable', 'covered', 'pending', 'empty', 'rejected'];
const pick = <T>(xs: T[]) => xs[Math.floor(Math.random() * xs.length)];
const BOUNDARY = '----headroom-load';

let uploadCounter = 0;
const acceptedIds: string[] = [];
function uploadBody(): string {
	// Every upload different (the registry refuses an identical file twice).
	const n = ++uploadCounter;
	const model = JSON.stringify({
		format: 'headroom-loop-model/1',
		title: `load ${process.pid}-${n}`,
		blocks: [{ type: 'polynomial', numerator: [1 + n * 1e-6 + Math.random() * 1e-9], denominator: [1, 3, 3, 1] }]
	});
	return `--${BOUNDARY}\r\nContent-Disposition: form-data; name="file"; filename="load-${n}.json"\r\nContent-Type: application/json\r\n\r\n${model}\r\n--${BOUNDARY}--\r\n`;
}

function requestsFor(kind: Kind, plan: LoadPlan): Request[] {
	const bearer = { authorization: `Bearer ${plan.token}`, accept: 'application/json' };
	switch (kind) {
		case 'api-filtered-list':
			return [{ method: 'GET', headers: bearer, setupRequest: (r) => ({ ...r, path: `/api/loops?verdict=${pick(VERDICTS)}&pageSize=50&page=${1 + Math.floor(Math.random() * 5)}` }) }];
		case 'api-loop':
			return [{ method: 'GET', headers: bearer, setupRequest: (r) => ({ ...r, path: `/api/loops/${pick(plan.loopIds)}` }) }];
		case 'loop-page':
			return [{ method: 'GET', headers: { cookie: plan.cookie, accept: 'text/html' }, setupRequest: (r) => ({ ...r, path: `/loops/${pick(plan.loopIds)}` }) }];
		case 'upload':
			return [
				{
					method: 'POST',
					headers: { ...bearer, 'content-type': `multipart/form-data; boundary=${BOUNDARY}` },
					setupRequest: (r) => ({ ...r, path: `/api/loops/${pick(plan.uploadLoopIds)}/revisions`, body: uploadBody() }),
					onResponse: (status, body) => {
						if (status === 202) acceptedIds.push((JSON.parse(body) as { revision: { id: string } }).revision.id);
					}
				}
			];
	}
}

function runKind(kind: Kind, plan: LoadPlan): Promise<KindResult> {
	return new Promise((resolve, reject) => {
		autocannon(
			{
				url: plan.base,
				connections: plan.connections[kind],
				duration: plan.seconds,
				timeout: 20,
				requests: requestsFor(kind, plan)
			},
			(err, result) => {
				if (err) return reject(err);
				const statusCodes = Object.fromEntries(Object.entries(result.statusCodeStats ?? {}).map(([code, s]) => [code, (s as { count: number }).count]));
				resolve({
					kind,
					requests: result.requests.total,
					throughput: result.requests.average,
					p50: result.latency.p50,
					p90: result.latency.p90,
					p99: result.latency.p99,
					max: result.latency.max,
					errors: result.errors,
					timeouts: result.timeouts,
					non2xx: result.non2xx,
					statusCodes,
					acceptedIds: kind === 'upload' ? acceptedIds : undefined
				});
			}
		);
	});
}

const plan = JSON.parse(process.argv[2]) as LoadPlan;
const kinds = Object.keys(plan.connections) as Kind[];
const results = await Promise.all(kinds.map((k) => runKind(k, plan)));
process.stdout.write(`${JSON.stringify(results)}\n`);
