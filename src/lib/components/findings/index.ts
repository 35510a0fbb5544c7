export { default as FindingBadge } from './FindingBadge.svelte';
export { default as FindingList } from './FindingList.svelte';
export { default as FirmnessBadge } from './FirmnessBadge.svelte';
export { formatNumber, withUnit } from './format';
