import { PageLoading } from '@/components/RouteStates';

export default function Loading() {
  return <PageLoading what="this page" />;
}
