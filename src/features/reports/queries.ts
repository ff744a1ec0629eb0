import { queryOptions } from '@tanstack/react-query';
import { reviewReportSchema } from '../../../shared/api/reports';
import { api } from '../../lib/api';

export function reviewReportQuery(runId: string) {
  return queryOptions({
    queryKey: ['runs', runId, 'report'],
    queryFn: ({ signal }) => api.get(`/api/runs/${encodeURIComponent(runId)}/report`, { signal, schema: reviewReportSchema }),
    retry: false,
  });
}
