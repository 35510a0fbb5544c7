import { problem } from '$lib/server/http/problem';
import type { RequestHandler } from './$types';

const notFound: RequestHandler = ({ url }) => problem(404, `No API route at ${url.pathname}.`);
export const GET = notFound;
export const POST = notFound;
export const PUT = notFound;
export const PATCH = notFound;
export const DELETE = notFound;
