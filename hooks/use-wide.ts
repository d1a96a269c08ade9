import { useEffect, useState } from 'react';
import { useWindowDimensions } from 'react-native';
import { wideBreakpoint } from '@/constants/theme';

/** True from the wide breakpoint up; false until mounted so the first render is stable. */
export function useWide(): boolean {
  const { width } = useWindowDimensions();
  const [mounted, setMounted] = useState(false);
  useEffect(() => setMounted(true), []);
  return mounted && width >= wideBreakpoint;
}
