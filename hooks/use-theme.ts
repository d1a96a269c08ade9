import { useColorScheme } from 'react-native';
import { palettes, type Palette, type Scheme } from '@/constants/theme';

/** The palette for the device's colour scheme. */
export function useTheme(): { scheme: Scheme; colors: Palette } {
  const scheme: Scheme = useColorScheme() === 'dark' ? 'dark' : 'light';
  return { scheme, colors: palettes[scheme] };
}
