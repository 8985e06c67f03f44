import { ReviewForbidden } from '@/components/judging/ReviewForbidden';

export default function Forbidden() {
  return <ReviewForbidden />;
}
