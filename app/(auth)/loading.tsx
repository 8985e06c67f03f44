import { PageLoading } from '@/components/RouteStates';

export default function Loading() {
  return <PageLoading what="your account page" />;
}
