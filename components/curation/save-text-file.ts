import { Share } from "react-native";

/** On a phone there is no download folder to speak of: the share sheet lets the curator send or save the text. */
export async function saveTextFile(filename: string, text: string): Promise<void> {
  await Share.share({ title: filename, message: text });
}
