// /models/<key> opens the first screen of the way through: Build.
import { redirect } from '@sveltejs/kit';
import { base } from '$app/paths';
import type { PageLoad } from './$types';

export const load: PageLoad = ({ params }) => {
  redirect(307, `${base}/models/${encodeURIComponent(params.entry)}/build`);
};
