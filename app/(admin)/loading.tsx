import { PageLoading } from '@/components/RouteStates';

export default function Loading() {
  return <PageLoading what="the admin pages" />;
}
