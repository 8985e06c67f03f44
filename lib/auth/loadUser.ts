import { cache } from 'react';
import { User } from '@/models';

/**
 * The signed-in user's row. Wrapped in React's cache so one page render (header, guard, session
 * callback) reads it once; outside a render (route handlers) it is a plain lookup.
 */
export const loadUser = cache((id: number) => User.findByPk(id));
