/** The customer and site answers (sites.service.ts). */
import type { CustomerRow, SiteRow } from '@coilpath/contract';
import type { CustomerSelect, SiteSelect } from './sites.repo';

const iso = (d: Date | null) => (d ? d.toISOString() : null);

export const toCustomerRow = (r: CustomerSelect): CustomerRow => ({ ...(r as unknown as CustomerRow), archivedAt: iso(r.archivedAt) });

export const toSiteRow = (r: SiteSelect): SiteRow => ({ ...(r as unknown as SiteRow), archivedAt: iso(r.archivedAt) });
